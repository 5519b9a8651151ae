/**
 * Sample covariances of consecutive processing windows that reuse the work of the overlap.
 *
 * Every window's R̂ is always summed the same way: the K snapshots are cut into K/g groups of
 * g consecutive snapshots (g fixed for the job), each group's Σ x·xᴴ is formed on its own, and
 * R̂ = (1/K)·Σ_t G_t in group order. When the new block starts with snapshots that the previous
 * block held at group boundary s (the window hop of the job runner's overlapping windows), the
 * groups they form are copied instead of recomputed, which gives bit-for-bit the numbers a fresh
 * computation would: a resumed job writes the same bytes as an uninterrupted one.
 * The overlap is verified sample by sample (exact equality), never assumed.
 *
 * Why: with the standard window hop (32 of K = 64 snapshots) half of every window's outer
 * products were already formed for the previous window; bench/dsp-engine.ts measures the
 * covariance stage with and without the overlap.
 */
import { accumulateOuterProducts, mirrorUpper } from './covariance.js';
import type { SnapshotBlock } from './window-engine.types.js';

/**
 * Group size g: the largest divisor of K that is at most K/2 (32 for K = 64), so a window hop of
 * K/2 (the standard job) reuses half the work. Smaller groups would let smaller hops reuse too,
 * but each group then costs more than its share: with g = 16 and no overlap,
 * bench/dsp-engine.ts measured ~135 µs CPU per window-bin against ~105 µs for one pass over K,
 * and the K/2 hop only came down to ~100 µs.
 */
export function covarianceGroupSize(k: number): number {
  for (let g = Math.floor(k / 2); g > 1; g--) if (k % g === 0) return g;
  return k;
}

export class WindowCovariances {
  readonly nBins: number;
  readonly channels: number;
  readonly snapshots: number;
  readonly groupSize: number;
  readonly groups: number;
  /** The last window's estimates, nBins·N²·2 (full Hermitian). */
  readonly covariances: Float64Array;
  /** (1/K)·Σ‖x‖⁴ per bin for the last window. */
  readonly fourthMoments: Float64Array;
  /** Groups taken over from the previous window in the last call (for benchmarks and tests). */
  reusedGroups = 0;
  private readonly groupSums: Float64Array; // ring: groups · nBins · N²·2 (upper triangles)
  private readonly groupFourth: Float64Array; // ring: groups · nBins
  private readonly previous: Float64Array; // the last block
  private head = 0; // ring slot of group 0 of the last window
  private hasPrevious = false;

  constructor(nBins: number, channels: number, snapshots: number) {
    this.nBins = nBins;
    this.channels = channels;
    this.snapshots = snapshots;
    this.groupSize = covarianceGroupSize(snapshots);
    this.groups = snapshots / this.groupSize;
    const m = 2 * channels * channels;
    this.covariances = new Float64Array(nBins * m);
    this.fourthMoments = new Float64Array(nBins);
    this.groupSums = this.groups > 1 ? new Float64Array(this.groups * nBins * m) : new Float64Array(0);
    this.groupFourth = new Float64Array(this.groups * nBins);
    this.previous = this.groups > 1 ? new Float64Array(nBins * snapshots * channels * 2) : new Float64Array(0);
  }

  /** Forms R̂ (and the fourth moments) of `block` (K snapshots per bin) into `covariances`. */
  update(block: SnapshotBlock): Float64Array {
    const n = this.channels;
    const k = this.snapshots;
    const nBins = this.nBins;
    const m = 2 * n * n;
    if (block.length < nBins * k * n * 2) {
      throw new RangeError(`snapshot block holds ${block.length} values but ${nBins} bins × ${k} snapshots × ${n} channels need ${nBins * k * n * 2}`);
    }
    const c = this.covariances;
    const inv = 1 / k;
    if (this.groups === 1) {
      c.fill(0);
      for (let b = 0; b < nBins; b++) {
        this.fourthMoments[b] = accumulateOuterProducts(c, b * m, block, b * k * n * 2, k, n, inv);
        mirrorUpper(c, b * m, n);
      }
      return c;
    }
    const shift = this.hasPrevious ? this.overlapShift(block) : 0;
    const kept = shift > 0 ? this.groups - shift : 0;
    this.head = (this.head + shift) % this.groups;
    this.reusedGroups = kept;
    const g = this.groupSize;
    const sums = this.groupSums;
    for (let t = kept; t < this.groups; t++) {
      const slot = (this.head + t) % this.groups;
      const base = slot * nBins * m;
      sums.fill(0, base, base + nBins * m);
      for (let b = 0; b < nBins; b++) {
        this.groupFourth[slot * nBins + b] = accumulateOuterProducts(sums, base + b * m, block, (b * k + t * g) * n * 2, g, n, 1);
      }
    }
    // R̂ = (1/K)·Σ_t G_t, always in group order t = 0…K/g−1, written to both triangles.
    const groups = this.groups;
    const slotStride = nBins * m;
    for (let b = 0; b < nBins; b++) {
      const off = b * m;
      let f4 = 0;
      for (let t = 0; t < groups; t++) f4 += this.groupFourth[((this.head + t) % groups) * nBins + b];
      this.fourthMoments[b] = f4 * inv;
      const s0 = ((this.head % groups) * slotStride) + off;
      const s1 = (((this.head + 1) % groups) * slotStride) + off;
      for (let i = 0; i < n; i++) {
        const rowI = 2 * i * n;
        for (let j = i; j < n; j++) {
          const at = rowI + 2 * j;
          let re = sums[s0 + at] + sums[s1 + at];
          let im = sums[s0 + at + 1] + sums[s1 + at + 1];
          for (let t = 2; t < groups; t++) {
            const st = (((this.head + t) % groups) * slotStride) + off + at;
            re += sums[st];
            im += sums[st + 1];
          }
          re *= inv;
          im *= inv;
          c[off + at] = re;
          c[off + 2 * (j * n + i)] = re;
          if (j === i) {
            c[off + at + 1] = 0;
          } else {
            c[off + at + 1] = im;
            c[off + 2 * (j * n + i) + 1] = -im;
          }
        }
      }
    }
    this.previous.set(block.subarray(0, this.previous.length));
    this.hasPrevious = true;
    return c;
  }

  /** Forgets the previous window (the next update recomputes every group). */
  reset(): void {
    this.hasPrevious = false;
    this.reusedGroups = 0;
  }

  /**
   * Smallest group shift s (1 ≤ s < K/g) such that, in every bin, snapshots [0, K − s·g) of the
   * new block equal snapshots [s·g, K) of the previous one exactly; 0 when there is none.
   */
  private overlapShift(block: SnapshotBlock): number {
    const n2 = 2 * this.channels;
    const k = this.snapshots;
    const g = this.groupSize;
    const prev = this.previous;
    for (let s = 1; s < this.groups; s++) {
      const lag = s * g;
      const len = (k - lag) * n2;
      let same = true;
      for (let b = 0; b < this.nBins && same; b++) {
        const nb = b * k * n2;
        const pb = nb + lag * n2;
        for (let i = 0; i < len; i++) {
          if (block[nb + i] !== prev[pb + i]) {
            same = false;
            break;
          }
        }
      }
      if (same) return s;
    }
    return 0;
  }
}
