/**
 * Bounds beyond which a header value is treated as damage rather than a real recording.
 * They are generous on purpose: the point is to catch garbage (a rate of 0 or 4 billion,
 * 60 000 channels) before it turns into a giant allocation or a meaningless job.
 */

/** Most channels one recording may carry; matches the array catalogue's 1024-element cap. */
export const MAX_CHANNELS = 1024;

/** Lowest accepted sample rate (Hz). Infrasound and slow geophone arrays still exceed it. */
export const MIN_SAMPLE_RATE_HZ = 1;

/**
 * Highest accepted rate for WAV/RF64 (Hz). Audio practice tops out near 768 kHz; ultrasonic
 * sonar and bat-detector arrays store a few MHz in WAV. Anything above 20 MHz in a WAV header
 * is far more likely corruption than data.
 */
export const MAX_WAV_SAMPLE_RATE_HZ = 20_000_000;

/**
 * Highest accepted rate for SigMF and raw baseband (Hz). Software-defined-radio arrays record
 * tens to a few hundred MS/s; 1 GS/s leaves room for wideband digitisers.
 */
export const MAX_BASEBAND_SAMPLE_RATE_HZ = 1_000_000_000;

/** Largest side-file text the parsers accept (characters): metadata, not sample data. */
export const MAX_SIDECAR_CHARS = 16 * 1024 * 1024;

/** How many bytes of a file's start the browser reads for header parsing. */
export const HEADER_PROBE_BYTES = 1024 * 1024;
