/**
 * Output size and run-time estimates for a beamforming job, shown on the job form before it is
 * queued. Pure arithmetic from the job's sizes; the throughput constant comes from
 * bench/dsp-engine.ts on the reference machine and can be overridden per deployment.
 */

/**
 * Engine cost per (window, bin) at N = 32, K = 64, 91 beams, in microseconds, for one unloaded
 * core. Measured 2026-12-03 on the 2-core development machine (AMD EPYC): bench/dsp-engine.ts
 * gives 175–187 µs for processWindow with the SIMD kernels (277 µs with NULLSMITH_KERNELS=js);
 * 200 leaves room for loading rules dearer than the noise floor. The first figure here (1000 µs,
 * from a heavily loaded machine and the first engine) made estimates about 7× too long.
 * Re-measure on the deployment machine and pass the result in. Scales roughly with
 * N²·(K + beams) + N³.
 */
export const REFERENCE_US_PER_WINDOW_BIN = 200;
/**
 * Effective STFT rate in flop/s, counting 5·nfft·log2(nfft) per frame and channel (the usual
 * radix-2 operation count, common practice): the standard 10-minute job's FFT stage took 3.3 s
 * for 600 000 channel-frames of nfft 512 (≈ 4.2 Gflop/s by that count, 2026-12-03); 3 Gflop/s
 * keeps a margin.
 */
export const REFERENCE_STFT_FLOPS = 3e9;
/** Reading, snapshot assembly and writing the records: about 15 % on top (bench/run.ts shares). */
const IO_OVERHEAD = 1.15;
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
 * Estimated run time in seconds on one core: engine cost per window-bin scaled from the
 * reference size, plus the STFT, plus reading and writing. For the standard benchmark job
 * (10 minutes, 584 windows × 84 bins) it gives ≈ 16.5 s against 13.1–13.6 s measured.
 */
export function estimateRunSeconds(s: JobSize, usPerWindowBin = REFERENCE_US_PER_WINDOW_BIN): number {
  const { frames, windows } = countWindows(s);
  const n = s.channels;
  const k = s.snapshotsPerWindow;
  const scale = (n * n * (k + s.beams) + n ** 3) / (REFERENCE.n ** 2 * (REFERENCE.k + REFERENCE.beams) + REFERENCE.n ** 3);
  const engine = windows * s.bins * usPerWindowBin * scale * 1e-6;
  const stft = (frames * n * 5 * s.nfft * Math.log2(s.nfft)) / REFERENCE_STFT_FLOPS;
  return (engine + stft) * IO_OVERHEAD;
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
