/**
 * Output size and run-time estimates for a beamforming job, shown on the job form before it is
 * queued. Pure arithmetic from the job's sizes; the throughput constant comes from
 * bench/dsp-engine.ts on the reference machine and can be overridden per deployment.
 */

/**
 * Engine cost per (window, bin) at N = 32, K = 64, 91 beams (bench/dsp-engine.ts, MPDR, trace
 * loading), in microseconds. First measurement: 3500–3900 µs on a 2-core machine with a load
 * average of ≈ 15 (about seven busy processes per core); 1000 µs is our estimate for one
 * unloaded core from that. Re-measure with `node --import tsx bench/dsp-engine.ts` on the
 * deployment machine and pass the result in. Scales roughly with N²·(K + beams) + N³.
 */
export const REFERENCE_US_PER_WINDOW_BIN = 1000;
const REFERENCE = { n: 32, k: 64, beams: 91 };

export interface JobSize {
  totalFrames: number;
  channels: number;
  nfft: number;
  hop: number;
  /** K snapshots per processing window and window hop in frames. */
  snapshotsPerWindow: number;
  windowHop: number;
  bins: number;
  beams: number;
  savedBeams: number;
}

/** Number of STFT frames and processing windows (CONVENTIONS.md "Time-frequency", "Windows and estimates"). */
export function countWindows(s: JobSize): { frames: number; windows: number } {
  const frames = s.totalFrames >= s.nfft ? Math.floor((s.totalFrames - s.nfft) / s.hop) + 1 : 0;
  const windows = frames >= s.snapshotsPerWindow ? Math.floor((frames - s.snapshotsPerWindow) / s.windowHop) + 1 : 0;
  return { frames, windows };
}

/**
 * Estimated run time in seconds: engine cost per window-bin scaled from the reference size, plus
 * the STFT (≈ 5·nfft·log2(nfft) flops per frame and channel at an assumed 0.5 Gflop/s, from memory).
 */
export function estimateRunSeconds(s: JobSize, usPerWindowBin = REFERENCE_US_PER_WINDOW_BIN): number {
  const { frames, windows } = countWindows(s);
  const n = s.channels;
  const k = s.snapshotsPerWindow;
  const scale = (n * n * (k + s.beams) + n ** 3) / (REFERENCE.n ** 2 * (REFERENCE.k + REFERENCE.beams) + REFERENCE.n ** 3);
  const engine = windows * s.bins * usPerWindowBin * scale * 1e-6;
  const stft = (frames * n * 5 * s.nfft * Math.log2(s.nfft)) / 0.5e9;
  return engine + stft;
}

/**
 * Rough size of the per-window CSV outputs in bytes: per window and beam about 6 numbers per bin
 * (adaptive and conventional power, WNG, SINR and its bounds) plus broadband values, and
 * N complex weights per saved beam and bin, at ~12 characters per number (common practice for
 * %.6g text).
 */
export function estimateOutputBytes(s: JobSize): number {
  const { windows } = countWindows(s);
  const perWindow = s.beams * (s.bins * 6 + 3) + s.bins * (s.channels + 6) + s.savedBeams * s.bins * s.channels * 2;
  return windows * perWindow * 12;
}
