/**
 * Covariance estimators per bin (CONVENTIONS.md "Windows and estimates"):
 *  - sample covariance R̂ = (1/K)·Σ x·xᴴ over a window (no mean removal, divide by K);
 *  - exponential forgetting R_m = α·R_{m−1} + (1−α)·x·xᴴ (K_eff = (1+α)/(1−α));
 *  - a sliding-window accumulator for overlapping windows (window hop < K).
 * Matrices are flat interleaved (re, im) row-major N×N, one after another per bin
 * (bin b at offset 2·N²·b). Alongside each matrix the estimators keep Σ‖x‖⁴/K (the fourth
 * moment the Ledoit–Wolf shrinkage needs).
 */
import { SimdGram } from './wasm/simd-gram.js';
import type { SnapshotBlock } from './window-engine.types.js';

/**
 * Channel-major copies of the snapshots being accumulated (re and im planes, N rows of `count`):
 * module scratch grown on demand, so steady-state calls allocate nothing.
 */
let planeRe = new Float64Array(0);
let planeIm = new Float64Array(0);

/**
 * Adds scale·Σ x·xᴴ over `count` snapshots of one bin to the upper triangle of r (the lower
 * triangle is not touched: call mirrorUpper afterwards). Returns scale·Σ‖x‖⁴ for the same snapshots.
 * `snapOff` is the offset (in doubles) of the first snapshot; snapshots are 2N doubles apart.
 *
 * Why this shape: the snapshots are first copied into channel-major re/im planes, then every
 * R_ij is a dot product over the snapshots kept in local variables, four entries (a 2×2 tile of
 * rows i, i+1 and columns j, j+1) at a time, so each element of R is written once per call and
 * each loaded sample feeds two complex multiply-adds. bench/dsp-engine.ts (N = 32, K = 64, 84
 * bins, CPU time): 251 µs per window-bin for the former snapshot-by-snapshot rank-one updates
 * (R read and written for every snapshot) against 90–120 µs for this form.
 */
export function accumulateOuterProducts(r: Float64Array, rOff: number, block: Float64Array, snapOff: number, count: number, n: number, scale: number): number {
  const simd = SimdGram.forShape(n, count);
  return simd ? accumulateWithSimd(simd, r, rOff, block, snapOff, count, n, scale) : accumulateOuterProductsJs(r, rOff, block, snapOff, count, n, scale);
}

/**
 * accumulateOuterProducts on the SIMD Gram kernel (wasm/assembly/gram.ts): same planes, same
 * 2×2 tiles, two snapshots per f64x2 lane pair. bench/dsp-engine.ts, N = 32, K = 64, window hop
 * 32, CPU per window-bin: 57 µs (JavaScript kernel) → 31 µs.
 */
function accumulateWithSimd(simd: SimdGram, r: Float64Array, rOff: number, block: Float64Array, snapOff: number, count: number, n: number, scale: number): number {
  const pr = simd.planeRe;
  const pi = simd.planeIm;
  const stride = simd.count;
  const fourth = toChannelPlanes(pr, pi, stride, block, snapOff, count, n);
  if (stride > count) {
    for (let i = 0; i < n; i++) {
      pr[i * stride + count] = 0;
      pi[i * stride + count] = 0;
    }
  }
  if (simd.channels > n) {
    pr.fill(0, n * stride, (n + 1) * stride);
    pi.fill(0, n * stride, (n + 1) * stride);
  }
  simd.run();
  const out = simd.out;
  const outRow = 2 * simd.channels;
  for (let i = 0; i < n; i++) {
    const rRow = rOff + 2 * i * n;
    const oRow = i * outRow;
    for (let j = i; j < n; j++) {
      r[rRow + 2 * j] += out[oRow + 2 * j] * scale;
      r[rRow + 2 * j + 1] += out[oRow + 2 * j + 1] * scale;
    }
  }
  return fourth * scale;
}

/**
 * Copies `count` snapshots (2N doubles apart from snapOff) into channel-major planes, row i at
 * i·stride, and returns Σ‖x‖⁴ over them (for Ledoit–Wolf).
 */
function toChannelPlanes(pr: Float64Array, pi: Float64Array, stride: number, block: Float64Array, snapOff: number, count: number, n: number): number {
  let fourth = 0;
  for (let k = 0; k < count; k++) {
    const x = snapOff + 2 * n * k;
    let norm2 = 0;
    for (let i = 0; i < n; i++) {
      const re = block[x + 2 * i];
      const im = block[x + 2 * i + 1];
      pr[i * stride + k] = re;
      pi[i * stride + k] = im;
      norm2 += re * re + im * im;
    }
    fourth += norm2 * norm2;
  }
  return fourth;
}

/** The JavaScript kernel: the reference the SIMD one is tested against, and the fallback. */
export function accumulateOuterProductsJs(r: Float64Array, rOff: number, block: Float64Array, snapOff: number, count: number, n: number, scale: number): number {
  if (planeRe.length < n * count) {
    planeRe = new Float64Array(n * count);
    planeIm = new Float64Array(n * count);
  }
  const pr = planeRe;
  const pi = planeIm;
  const fourth = toChannelPlanes(pr, pi, count, block, snapOff, count, n);
  let i = 0;
  for (; i + 1 < n; i += 2) {
    const a = i * count;
    const b = a + count;
    const row0 = rOff + 2 * i * n;
    const row1 = row0 + 2 * n;
    // R_ij += scale·Σ_k x_ik·conj(x_jk) for the 2×2 tiles with j ≥ i.
    let j = i;
    for (; j + 1 < n; j += 2) {
      const c = j * count;
      const d = c + count;
      let s00r = 0, s00i = 0, s01r = 0, s01i = 0, s10r = 0, s10i = 0, s11r = 0, s11i = 0;
      for (let k = 0; k < count; k++) {
        const ar = pr[a + k], ai = pi[a + k];
        const br = pr[b + k], bi = pi[b + k];
        const cr = pr[c + k], ci = pi[c + k];
        const dr = pr[d + k], di = pi[d + k];
        s00r += ar * cr + ai * ci;
        s00i += ai * cr - ar * ci;
        s01r += ar * dr + ai * di;
        s01i += ai * dr - ar * di;
        s10r += br * cr + bi * ci;
        s10i += bi * cr - br * ci;
        s11r += br * dr + bi * di;
        s11i += bi * dr - br * di;
      }
      r[row0 + 2 * j] += s00r * scale;
      r[row0 + 2 * j + 1] += s00i * scale;
      r[row0 + 2 * j + 2] += s01r * scale;
      r[row0 + 2 * j + 3] += s01i * scale;
      if (j > i) {
        // On the diagonal tile (j = i) entry (i+1, i) is in the lower triangle: not ours to write.
        r[row1 + 2 * j] += s10r * scale;
        r[row1 + 2 * j + 1] += s10i * scale;
      }
      r[row1 + 2 * j + 2] += s11r * scale;
      r[row1 + 2 * j + 3] += s11i * scale;
    }
    if (j < n) {
      // Odd N: last column of rows i and i+1.
      const c = j * count;
      let s0r = 0, s0i = 0, s1r = 0, s1i = 0;
      for (let k = 0; k < count; k++) {
        const ar = pr[a + k], ai = pi[a + k];
        const br = pr[b + k], bi = pi[b + k];
        const cr = pr[c + k], ci = pi[c + k];
        s0r += ar * cr + ai * ci;
        s0i += ai * cr - ar * ci;
        s1r += br * cr + bi * ci;
        s1i += bi * cr - br * ci;
      }
      r[row0 + 2 * j] += s0r * scale;
      r[row0 + 2 * j + 1] += s0i * scale;
      r[row1 + 2 * j] += s1r * scale;
      r[row1 + 2 * j + 1] += s1i * scale;
    }
  }
  if (i < n) {
    // Odd N: the last row has only its diagonal entry in the upper triangle.
    const a = i * count;
    let s = 0;
    for (let k = 0; k < count; k++) s += pr[a + k] * pr[a + k] + pi[a + k] * pi[a + k];
    r[rOff + 2 * (i * n + i)] += s * scale;
  }
  return fourth * scale;
}

/** Copies the conjugate of the upper triangle into the lower triangle; forces a real diagonal. */
export function mirrorUpper(r: Float64Array, rOff: number, n: number): void {
  for (let i = 0; i < n; i++) {
    r[rOff + 2 * (i * n + i) + 1] = 0;
    for (let j = i + 1; j < n; j++) {
      r[rOff + 2 * (j * n + i)] = r[rOff + 2 * (i * n + j)];
      r[rOff + 2 * (j * n + i) + 1] = -r[rOff + 2 * (i * n + j) + 1];
    }
  }
}

/**
 * Sample covariance of every bin of a snapshot block (layout of window-engine.types.ts) into
 * covs (nBins·N²·2); fourthMoments[b] receives (1/K)·Σ‖x_k‖⁴.
 */
export function blockCovariances(covs: Float64Array, fourthMoments: Float64Array, block: SnapshotBlock, nBins: number, k: number, n: number): void {
  if (block.length < nBins * k * n * 2) {
    throw new RangeError(`snapshot block holds ${block.length} values but ${nBins} bins × ${k} snapshots × ${n} channels need ${nBins * k * n * 2}`);
  }
  const m = 2 * n * n;
  covs.fill(0, 0, nBins * m);
  for (let b = 0; b < nBins; b++) {
    fourthMoments[b] = accumulateOuterProducts(covs, b * m, block, b * k * n * 2, k, n, 1 / k);
    mirrorUpper(covs, b * m, n);
  }
}

/** Exponential forgetting per bin: R_m = α·R_{m−1} + (1−α)·x_m·x_mᴴ. */
export class ForgettingCovariance {
  readonly nBins: number;
  readonly channels: number;
  readonly alpha: number;
  /** Variance-equivalent support (1+α)/(1−α) (DOMAIN.md §2, derived). */
  readonly effectiveSnapshots: number;
  /** Current estimates, nBins·N²·2 (full Hermitian matrices). */
  readonly covariances: Float64Array;
  /** Forgetting average of ‖x‖⁴ per bin (for Ledoit–Wolf). */
  readonly fourthMoments: Float64Array;
  private seen = 0;

  constructor(nBins: number, channels: number, alpha: number) {
    if (!(alpha > 0 && alpha < 1)) throw new RangeError(`forgetting factor α must lie strictly between 0 and 1, got ${alpha}`);
    this.nBins = nBins;
    this.channels = channels;
    this.alpha = alpha;
    this.effectiveSnapshots = (1 + alpha) / (1 - alpha);
    this.covariances = new Float64Array(nBins * channels * channels * 2);
    this.fourthMoments = new Float64Array(nBins);
  }

  /** Snapshots absorbed so far. */
  get snapshotsSeen(): number {
    return this.seen;
  }

  /** True once K_eff snapshots have entered; earlier outputs should be flagged as warming up. */
  get warmedUp(): boolean {
    return this.seen >= this.effectiveSnapshots;
  }

  /** Absorbs `count` snapshots per bin, in order, from a block laid out with `count` snapshots per bin. */
  update(block: SnapshotBlock, count: number): void {
    const n = this.channels;
    const m = 2 * n * n;
    const a = this.alpha;
    const c = this.covariances;
    for (let b = 0; b < this.nBins; b++) {
      const off = b * m;
      for (let k = 0; k < count; k++) {
        // Scale the upper triangle by α, then add (1−α)·x·xᴴ to it.
        for (let i = 0; i < n; i++) {
          for (let j = i; j < n; j++) {
            c[off + 2 * (i * n + j)] *= a;
            c[off + 2 * (i * n + j) + 1] *= a;
          }
        }
        const f = accumulateOuterProducts(c, off, block, (b * count + k) * n * 2, 1, n, 1 - a);
        this.fourthMoments[b] = a * this.fourthMoments[b] + f;
      }
      mirrorUpper(c, off, n);
    }
    this.seen += count;
  }
}

/**
 * Sliding-window sample covariance for overlapping windows (window hop H < K), kept as a ring
 * of partial sums over groups of g = gcd(K, H) snapshots: each new window adds H/g fresh group
 * sums and the estimate is the sum of the last K/g groups.
 *
 * Why partial sums and not "add the new snapshots, subtract the old ones": bench/dsp-sliding.ts
 * (N = 32, K = 64, one bin; measured on a shared, heavily loaded 2-core machine, so noisy)
 * gave µs per window, ring vs add/subtract: H=1 1292 vs 41, H=4 393 vs 78, H=8 214 vs 135,
 * H=16 130 vs 434, H=32 297 vs 292. Add/subtract wins for small hops (H < √K) but drifts in
 * floating point and needs the K old snapshots kept plus a periodic exact recompute; partial
 * sums never drift, hold only K/g matrices, and are as fast or faster for the hops the job form
 * offers (H ≥ K/4). We keep partial sums; a small-hop add/subtract path is a possible follow-up.
 */
export class SlidingCovariance {
  readonly nBins: number;
  readonly channels: number;
  readonly snapshotsPerWindow: number;
  readonly windowHop: number;
  readonly groupSize: number;
  readonly groups: number;
  /** The current window's estimates, nBins·N²·2 (valid after `current()`). */
  readonly covariances: Float64Array;
  /** (1/K)·Σ‖x‖⁴ per bin for the current window. */
  readonly fourthMoments: Float64Array;
  private readonly ring: Float64Array; // groups · nBins · N²·2 (upper triangles, unscaled sums)
  private readonly ringFourth: Float64Array; // groups · nBins
  private next = 0;
  private filled = 0;

  constructor(nBins: number, channels: number, snapshotsPerWindow: number, windowHop: number) {
    if (!Number.isInteger(windowHop) || windowHop < 1 || windowHop > snapshotsPerWindow) {
      throw new RangeError(`window hop must be an integer from 1 to K = ${snapshotsPerWindow} snapshots, got ${windowHop}`);
    }
    this.nBins = nBins;
    this.channels = channels;
    this.snapshotsPerWindow = snapshotsPerWindow;
    this.windowHop = windowHop;
    this.groupSize = gcd(snapshotsPerWindow, windowHop);
    this.groups = snapshotsPerWindow / this.groupSize;
    const m = 2 * channels * channels;
    this.covariances = new Float64Array(nBins * m);
    this.fourthMoments = new Float64Array(nBins);
    this.ring = new Float64Array(this.groups * nBins * m);
    this.ringFourth = new Float64Array(this.groups * nBins);
  }

  /** True once K snapshots have been pushed. */
  get ready(): boolean {
    return this.filled >= this.groups;
  }

  /**
   * Pushes `count` new snapshots per bin (a multiple of the group size, normally K for the first
   * window and H afterwards) from a block laid out with `count` snapshots per bin.
   */
  push(block: SnapshotBlock, count: number): void {
    const g = this.groupSize;
    if (count % g !== 0) throw new RangeError(`push ${count} snapshots: must be a multiple of ${g} (gcd of K and the window hop)`);
    const n = this.channels;
    const m = 2 * n * n;
    for (let start = 0; start < count; start += g) {
      const slot = this.next;
      const base = slot * this.nBins * m;
      this.ring.fill(0, base, base + this.nBins * m);
      for (let b = 0; b < this.nBins; b++) {
        this.ringFourth[slot * this.nBins + b] = accumulateOuterProducts(this.ring, base + b * m, block, (b * count + start) * n * 2, g, n, 1);
      }
      this.next = (slot + 1) % this.groups;
      if (this.filled < this.groups) this.filled++;
    }
  }

  /** Sums the ring into `covariances` (scaled by 1/K, mirrored) and returns it. */
  current(): Float64Array {
    if (!this.ready) throw new RangeError(`sliding covariance holds ${this.filled * this.groupSize} of K = ${this.snapshotsPerWindow} snapshots: push more before reading`);
    const n = this.channels;
    const m = 2 * n * n;
    const total = this.nBins * m;
    const c = this.covariances;
    c.fill(0);
    this.fourthMoments.fill(0);
    for (let s = 0; s < this.groups; s++) {
      const base = s * total;
      for (let i = 0; i < total; i++) c[i] += this.ring[base + i];
      for (let b = 0; b < this.nBins; b++) this.fourthMoments[b] += this.ringFourth[s * this.nBins + b];
    }
    const inv = 1 / this.snapshotsPerWindow;
    for (let i = 0; i < total; i++) c[i] *= inv;
    for (let b = 0; b < this.nBins; b++) {
      this.fourthMoments[b] *= inv;
      mirrorUpper(c, b * m, n);
    }
    return c;
  }
}

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return a;
}
