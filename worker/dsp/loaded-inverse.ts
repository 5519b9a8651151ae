/**
 * Q = R_L⁻¹ and Q² from the Cholesky factor R_L = L·Lᴴ, for evaluating vᴴQv (= 1/Capon power)
 * and vᴴQ²v (= ‖R_L⁻¹v‖², hence ‖w‖² = vᴴQ²v/(vᴴQv)²) of a whole fan of look directions by
 * the array's distinct baselines (baseline-groups.ts), instead of two triangular substitutions
 * (N² complex multiply-adds) per beam.
 *
 * Cost per (bin, window), N = 32: L⁻¹ ≈ N³/6, Q = L⁻ᴴL⁻¹ ≈ N³/6, Q² ≈ N³/2 complex
 * multiply-adds (≈ 27 k in all) against 91·N² ≈ 93 k for the substitutions of 91 beams; the
 * per-beam work then drops to G (31 baselines) complex multiply-adds per form.
 * bench/dsp-engine.ts, CPU per window-bin: 425–580 µs for the 91 substitutions against
 * ≈ 95–125 µs for Q and Q² plus ≈ 40 µs for the grouped forms of 91 beams.
 *
 * Accuracy (why this is only used under a condition-number guard, see window-engine.ts):
 * an explicit inverse is not backward stable the way substitution is. The grouped sum
 * tr Q + 2·Re Σ c_g·e_g adds terms as large as ‖Q‖ = 1/λ_min to reach a result as small as
 * N/λ_max (a beam on the strongest source), so rounding alone costs a relative
 * ≈ eps·cond(R_L) in vᴴQv and ≈ eps·cond² in vᴴQ²v (terms ‖Q²‖ = 1/λ_min² against
 * N/λ_max²); the rounding of Q itself adds errors of the same order. With eps = 2.2e-16 and
 * cond ≤ 1e5 that is ≤ 2e-11 and ≤ 2e-6 relative at worst, the latter only for beams on the
 * strongest source, whose ‖w‖² (hence WNG) is then still good to a few float32 ulps
 * (the columns are written as float32, relative precision 6e-8). Measured errors against the
 * substitution path are far smaller (tests/dsp/loaded-inverse.test.ts).
 *
 * Storage: flat interleaved (re, im) row-major N×N, as hermitian-cholesky.ts. No allocation
 * after construction.
 *
 * For even N the three products run on the SIMD kernels (wasm/assembly/loaded-inverse.ts, same
 * loops and tiles) and the matrices below are views of that kernel instance's memory; the
 * JavaScript methods stay as the reference (tests/dsp/simd-kernels.test.ts) and the fallback.
 * bench/dsp-engine.ts, N = 32, CPU per window-bin: Q and Q² 65 µs (JavaScript) → 19 µs.
 */
import { instantiateKernels, kernelView, type KernelExports } from './wasm/simd-kernels.js';

export class LoadedInverse {
  readonly n: number;
  /** Xᵀ for X = L⁻¹: row j holds column j of X (entries i ≥ j; zeros before the diagonal). */
  readonly lowerInverseT: Float64Array;
  /** Q = R_L⁻¹, full Hermitian. */
  readonly q: Float64Array;
  /** Q² = R_L⁻², upper triangle (strict lower never written). */
  readonly q2: Float64Array;

  private readonly kernels: KernelExports | null;
  /** The factor's copy in the kernel instance's memory (SIMD path only). */
  private readonly factor: Float64Array;

  constructor(n: number, useSimd = true) {
    this.n = n;
    const m = 2 * n * n;
    const kernels = useSimd && n % 2 === 0 ? instantiateKernels(4 * 8 * m) : null;
    this.kernels = kernels;
    if (kernels) {
      this.factor = kernelView(kernels, 0, m);
      this.lowerInverseT = kernelView(kernels, 8 * m, m);
      this.q = kernelView(kernels, 16 * m, m);
      this.q2 = kernelView(kernels, 24 * m, m);
    } else {
      this.factor = new Float64Array(0);
      this.lowerInverseT = new Float64Array(m);
      this.q = new Float64Array(m);
      this.q2 = new Float64Array(m);
    }
  }

  /** Forms L⁻¹, Q and Q² from the factor L (lower triangle of `l`, as choleskyFactor writes it). */
  fromFactor(l: Float64Array): void {
    const kernels = this.kernels;
    if (kernels) {
      const m = 2 * this.n * this.n;
      this.factor.set(l.length === m ? l : l.subarray(0, m));
      kernels.invertLower(0, 8 * m, this.n);
      kernels.gramOfInverse(8 * m, 16 * m, this.n);
      kernels.squareOfHermitian(16 * m, 24 * m, this.n);
      return;
    }
    this.invertLower(l);
    this.gramOfInverse();
    this.squareOfQ();
  }

  /**
   * Column j of X = L⁻¹ by forward substitution of L·x = e_j, stored as row j of
   * lowerInverseT (Xᵀ: entry (j, i) = X_ij, zero for i < j): X_jj = 1/L_jj,
   * X_ij = −(Σ_{k=j}^{i−1} L_ik·X_kj)/L_ii. Dot products along contiguous rows of L and of Xᵀ,
   * two columns per pass so each loaded L_ik serves both (X_{j,j+1} = 0 makes the ranges equal).
   * Measured, CPU per window-bin, N = 32: 36–39 µs as row axpys → 16 µs this way; the Gram
   * product below 44–49 µs as rank-one updates → 25 µs as blocked dot products.
   */
  private invertLower(l: Float64Array): void {
    const n = this.n;
    const t = this.lowerInverseT;
    const n2 = 2 * n;
    let j = 0;
    for (; j + 1 < n; j += 2) {
      const rA = j * n2;
      const rB = rA + n2;
      t[rA + 2 * j] = 1 / l[j * n2 + 2 * j];
      t[rA + 2 * j + 1] = 0;
      const d1 = 1 / l[rB + 2 * j + 2];
      t[rA + 2 * j + 2] = -(l[rB + 2 * j] * t[rA + 2 * j]) * d1;
      t[rA + 2 * j + 3] = -(l[rB + 2 * j + 1] * t[rA + 2 * j]) * d1;
      t[rB + 2 * j] = 0;
      t[rB + 2 * j + 1] = 0;
      t[rB + 2 * j + 2] = d1;
      t[rB + 2 * j + 3] = 0;
      for (let i = j + 2; i < n; i++) {
        const rL = i * n2;
        let ar = 0, ai = 0, br = 0, bi = 0;
        for (let k = 2 * j; k < 2 * i; k += 2) {
          const lr = l[rL + k], li = l[rL + k + 1];
          const xr = t[rA + k], xi = t[rA + k + 1];
          const yr = t[rB + k], yi = t[rB + k + 1];
          ar += lr * xr - li * xi;
          ai += lr * xi + li * xr;
          br += lr * yr - li * yi;
          bi += lr * yi + li * yr;
        }
        const d = -1 / l[rL + 2 * i];
        t[rA + 2 * i] = ar * d;
        t[rA + 2 * i + 1] = ai * d;
        t[rB + 2 * i] = br * d;
        t[rB + 2 * i + 1] = bi * d;
      }
    }
    if (j < n) {
      // n odd: the last column is the single entry 1/L_jj.
      t[j * n2 + 2 * j] = 1 / l[j * n2 + 2 * j];
      t[j * n2 + 2 * j + 1] = 0;
    }
  }

  /**
   * Q = XᴴX: Q_ij = Σ_{k≥j} conj(X_ki)·X_kj = Σ_k conj(Xᵀ_ik)·Xᵀ_jk for i ≤ j, dot products of
   * rows of Xᵀ two by two (rows below their diagonal are zero, so every sum may start at k = j);
   * then the lower triangle mirrored by conjugation.
   */
  private gramOfInverse(): void {
    const n = this.n;
    const t = this.lowerInverseT;
    const q = this.q;
    const n2 = 2 * n;
    let i = 0;
    for (; i + 1 < n; i += 2) {
      const rI = i * n2;
      const rI1 = rI + n2;
      let j = i;
      for (; j + 1 < n; j += 2) {
        const rJ = j * n2;
        const rJ1 = rJ + n2;
        let aar = 0, aai = 0, abr = 0, abi = 0, bar = 0, bai = 0, bbr = 0, bbi = 0;
        for (let k = 2 * j; k < n2; k += 2) {
          const xr = t[rI + k], xi = t[rI + k + 1];
          const yr = t[rI1 + k], yi = t[rI1 + k + 1];
          const cr = t[rJ + k], ci = t[rJ + k + 1];
          const dr = t[rJ1 + k], di = t[rJ1 + k + 1];
          aar += xr * cr + xi * ci;
          aai += xr * ci - xi * cr;
          abr += xr * dr + xi * di;
          abi += xr * di - xi * dr;
          bar += yr * cr + yi * ci;
          bai += yr * ci - yi * cr;
          bbr += yr * dr + yi * di;
          bbi += yr * di - yi * dr;
        }
        q[rI + 2 * j] = aar;
        q[rI + 2 * j + 1] = i === j ? 0 : aai;
        q[rI + 2 * j + 2] = abr;
        q[rI + 2 * j + 3] = abi;
        if (j > i) {
          q[rI1 + 2 * j] = bar;
          q[rI1 + 2 * j + 1] = bai;
        }
        q[rI1 + 2 * j + 2] = bbr;
        q[rI1 + 2 * j + 3] = i === j ? 0 : bbi;
      }
      if (j < n) {
        this.gramEntry(i, j);
        this.gramEntry(i + 1, j);
      }
    }
    if (i < n) this.gramEntry(i, i);
    for (let a = 0; a < n; a++) {
      for (let b = a + 1; b < n; b++) {
        q[2 * (b * n + a)] = q[2 * (a * n + b)];
        q[2 * (b * n + a) + 1] = -q[2 * (a * n + b) + 1];
      }
    }
  }

  /** One entry Q_ij, i ≤ j (odd leftovers of gramOfInverse's 2×2 blocks). */
  private gramEntry(i: number, j: number): void {
    const n2 = 2 * this.n;
    const t = this.lowerInverseT;
    let sr = 0;
    let si = 0;
    for (let k = 2 * j; k < n2; k += 2) {
      const ar = t[i * n2 + k], ai = t[i * n2 + k + 1];
      const br = t[j * n2 + k], bi = t[j * n2 + k + 1];
      sr += ar * br + ai * bi;
      si += ar * bi - ai * br;
    }
    this.q[i * n2 + 2 * j] = sr;
    this.q[i * n2 + 2 * j + 1] = i === j ? 0 : si;
  }

  /**
   * (Q²)_ij = Σ_k Q_ik·Q_kj = Σ_k Q_ik·conj(Q_jk) (Q Hermitian): dot products of rows i and j,
   * i ≤ j, two rows by two rows so that each loaded element serves two products (measured,
   * CPU per window-bin, N = 32: 101 µs one dot product at a time → 52–61 µs).
   */
  private squareOfQ(): void {
    const n = this.n;
    const q = this.q;
    const q2 = this.q2;
    const n2 = 2 * n;
    let i = 0;
    for (; i + 1 < n; i += 2) {
      const rI = i * n2;
      const rI1 = rI + n2;
      let j = i;
      for (; j + 1 < n; j += 2) {
        const rJ = j * n2;
        const rJ1 = rJ + n2;
        let aar = 0, aai = 0, abr = 0, abi = 0, bar = 0, bai = 0, bbr = 0, bbi = 0;
        for (let k = 0; k < n2; k += 2) {
          const xr = q[rI + k], xi = q[rI + k + 1];
          const yr = q[rI1 + k], yi = q[rI1 + k + 1];
          const cr = q[rJ + k], ci = q[rJ + k + 1];
          const dr = q[rJ1 + k], di = q[rJ1 + k + 1];
          aar += xr * cr + xi * ci;
          aai += xi * cr - xr * ci;
          abr += xr * dr + xi * di;
          abi += xi * dr - xr * di;
          bar += yr * cr + yi * ci;
          bai += yi * cr - yr * ci;
          bbr += yr * dr + yi * di;
          bbi += yi * dr - yr * di;
        }
        q2[rI + 2 * j] = aar;
        q2[rI + 2 * j + 1] = i === j ? 0 : aai;
        q2[rI + 2 * j + 2] = abr;
        q2[rI + 2 * j + 3] = abi;
        if (j > i) {
          q2[rI1 + 2 * j] = bar;
          q2[rI1 + 2 * j + 1] = bai;
        }
        q2[rI1 + 2 * j + 2] = bbr;
        q2[rI1 + 2 * j + 3] = i === j ? 0 : bbi;
      }
      if (j < n) {
        this.dotInto(i, j);
        this.dotInto(i + 1, j);
      }
    }
    if (i < n) this.dotInto(i, i);
  }

  /** One entry (Q²)_ij, i ≤ j (the odd row or column left over by squareOfQ's 2×2 blocks). */
  private dotInto(i: number, j: number): void {
    const n2 = 2 * this.n;
    const q = this.q;
    let sr = 0;
    let si = 0;
    for (let k = 0; k < n2; k += 2) {
      const ar = q[i * n2 + k], ai = q[i * n2 + k + 1];
      const br = q[j * n2 + k], bi = q[j * n2 + k + 1];
      sr += ar * br + ai * bi;
      si += ai * br - ar * bi;
    }
    this.q2[i * n2 + 2 * j] = sr;
    this.q2[i * n2 + 2 * j + 1] = i === j ? 0 : si;
  }

}
