/**
 * The last K frames' snapshots per bin, so overlapping windows (window hop < K) reuse FFTs
 * instead of recomputing them. Frame m lives in slot m mod K; the storage has the snapshot-block
 * layout of window-engine.types.ts with K snapshots per bin, so when a window starts on a
 * multiple of K (and no weighting applies) the ring itself is the window's block.
 */
import type { SnapshotBlock } from '../dsp/window-engine.types.js';

export class SnapshotRing {
  readonly storage: Float64Array;
  private readonly block: Float64Array;
  /**
   * Per-snapshot amplitude scale for exponential forgetting (null for the plain sliding
   * window). Scaling snapshot k by √(K·c_k) makes the engine's (1/K)·Σ x·xᴴ equal Σ c_k·x·xᴴ.
   */
  private readonly scale: Float64Array | null;

  constructor(
    readonly bins: number,
    readonly snapshots: number,
    readonly channels: number,
    forgetting: number | null,
  ) {
    const size = bins * snapshots * channels * 2;
    this.storage = new Float64Array(size);
    this.block = new Float64Array(size);
    this.scale = forgetting === null ? null : exponentialScales(snapshots, forgetting);
  }

  slotOf(frame: number): number {
    return frame % this.snapshots;
  }

  /**
   * The snapshots of frames [firstFrame, firstFrame + K) in time order, ready for the engine.
   * Returns the ring itself when no reordering or weighting is needed (no copy).
   */
  windowBlock(firstFrame: number): SnapshotBlock {
    const k = this.snapshots;
    const rot = firstFrame % k;
    if (rot === 0 && this.scale === null) return this.storage;
    const stride = this.channels * 2;
    const ring = this.storage;
    const out = this.block;
    const scale = this.scale;
    for (let b = 0; b < this.bins; b++) {
      const base = b * k * stride;
      for (let s = 0; s < k; s++) {
        const src = base + ((rot + s) % k) * stride;
        const dst = base + s * stride;
        const g = scale === null ? 1 : scale[s];
        for (let i = 0; i < stride; i++) out[dst + i] = ring[src + i] * g;
      }
    }
    return out;
  }
}

/**
 * Amplitude scales for exponential forgetting over K snapshots, oldest first:
 * c_k = (1−α)·α^(K−1−k) / (1 − α^K) (the recursion R_m = α·R_{m−1} + (1−α)·x·xᴴ started K frames
 * back, renormalised to unit total weight); returned as √(K·c_k).
 */
export function exponentialScales(k: number, alpha: number): Float64Array {
  const out = new Float64Array(k);
  const norm = (1 - alpha) / (1 - Math.pow(alpha, k));
  for (let s = 0; s < k; s++) out[s] = Math.sqrt(k * norm * Math.pow(alpha, k - 1 - s));
  return out;
}
