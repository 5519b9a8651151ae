/** Public face of the recording-format parsers (pure; safe in the browser). */
export { RecordingFormatError, type RecordingFormatErrorJson } from './recording-format-error.js';
export { recordingDescriptionSchema, bytesPerFrame, durationSeconds, type RecordingDescription } from './recording-description.js';
export { SAMPLE_ENCODINGS, ENCODING_BYTES, ENCODING_FULL_SCALE, parseSigmfDatatype, datatypeOf, type SampleEncoding, type ParsedDatatype } from './sample-encoding.js';
export { parseWavHeader } from './wav-header.js';
export { parseSigmfMeta, sigmfPointToArrayFrame } from './sigmf-meta.js';
export { parseRawSidecar, rawSidecarSchema, type RawSidecar } from './raw-sidecar.js';
export { detectFormat, type DetectedFileKind } from './detect-format.js';
export { MAX_CHANNELS, MIN_SAMPLE_RATE_HZ, MAX_WAV_SAMPLE_RATE_HZ, MAX_BASEBAND_SAMPLE_RATE_HZ, MAX_SIDECAR_CHARS, HEADER_PROBE_BYTES } from './limits.js';
