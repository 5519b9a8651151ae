/**
 * Q = R_L⁻¹ and Q² from the Cholesky factor R_L = L·Lᴴ, for evaluating vᴴQv (= 1/Capon power)
 * and vᴴQ²v (= ‖R_L⁻¹v‖², hence ‖w‖² = vᴴQ²v/(vᴴQv)²) of a whole fan of look directions by
 * the array's distinct baselines (baseline-groups.ts), instead of two triangular substitutions
 * (N² complex multiply-adds) per beam.
 *
 * Cost per (bin, window), N = 32: L⁻¹ ≈ N³/6, Q = L⁻ᴴL⁻¹ ≈ N³/6, Q² ≈ N³/2 complex
 * multiply-adds (≈ 27 k in all) against 91·N² ≈ 93 k for the substitutions of 91 beams; the
 * per-beam work then drops to G (31 baselines) complex multiply-adds per form.
 * bench/dsp-engine.ts records the measured figures.
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
 */
export class LoadedInverse {
  readonly n: number;
  /** X = L⁻¹, lower triangle (the strict upper triangle is never read). */
  readonly lowerInverse: Float64Array;
  /** Q = R_L⁻¹, full Hermitian. */
  readonly q: Float64Array;
  /** Q² = R_L⁻², upper triangle (strict lower never written). */
  readonly q2: Float64Array;

  constructor(n: number) {
    this.n = n;
    this.lowerInverse = new Float64Array(2 * n * n);
    this.q = new Float64Array(2 * n * n);
    this.q2 = new Float64Array(2 * n * n);
  }

  /** Forms L⁻¹, Q and Q² from the factor L (lower triangle of `l`, as choleskyFactor writes it). */
  fromFactor(l: Float64Array): void {
    this.invertLower(l);
    this.gramOfInverse();
    this.squareOfQ();
  }

  /**
   * X = L⁻¹ row by row: X_ii = 1/L_ii, X_ij = −(1/L_ii)·Σ_{k=j}^{i−1} L_ik·X_kj (j < i).
   * Accumulated as row axpys (row k of X scaled by L_ik), so every inner loop runs along a
   * contiguous row.
   */
  private invertLower(l: Float64Array): void {
    const n = this.n;
    const x = this.lowerInverse;
    for (let i = 0; i < n; i++) {
      const rowI = 2 * i * n;
      for (let j = 0; j < 2 * i; j++) x[rowI + j] = 0;
      for (let k = 0; k < i; k++) {
        const lr = l[rowI + 2 * k];
        const li = l[rowI + 2 * k + 1];
        const rowK = 2 * k * n;
        for (let j = 0; j <= k; j++) {
          const xr = x[rowK + 2 * j];
          const xi = x[rowK + 2 * j + 1];
          x[rowI + 2 * j] += lr * xr - li * xi;
          x[rowI + 2 * j + 1] += lr * xi + li * xr;
        }
      }
      const inv = 1 / l[rowI + 2 * i];
      for (let j = 0; j < 2 * i; j++) x[rowI + j] *= -inv;
      x[rowI + 2 * i] = inv;
      x[rowI + 2 * i + 1] = 0;
    }
  }

  /**
   * Q = XᴴX as a sum of rank-one updates by the rows of X: Q_ij += conj(X_ki)·X_kj for i ≤ j ≤ k
   * (upper triangle, contiguous in j), then the lower triangle mirrored by conjugation.
   */
  private gramOfInverse(): void {
    const n = this.n;
    const x = this.lowerInverse;
    const q = this.q;
    q.fill(0);
    for (let k = 0; k < n; k++) {
      const rowK = 2 * k * n;
      for (let i = 0; i <= k; i++) {
        const ar = x[rowK + 2 * i];
        const ai = -x[rowK + 2 * i + 1]; // conj(X_ki)
        const rowI = 2 * i * n;
        for (let j = i; j <= k; j++) {
          const br = x[rowK + 2 * j];
          const bi = x[rowK + 2 * j + 1];
          q[rowI + 2 * j] += ar * br - ai * bi;
          q[rowI + 2 * j + 1] += ar * bi + ai * br;
        }
      }
    }
    for (let i = 0; i < n; i++) {
      q[2 * (i * n + i) + 1] = 0;
      for (let j = i + 1; j < n; j++) {
        q[2 * (j * n + i)] = q[2 * (i * n + j)];
        q[2 * (j * n + i) + 1] = -q[2 * (i * n + j) + 1];
      }
    }
  }

  /** (Q²)_ij = Σ_k Q_ik·Q_kj = Σ_k Q_ik·conj(Q_jk) (Q Hermitian): dot products of rows i and j, i ≤ j. */
  private squareOfQ(): void {
    const n = this.n;
    const q = this.q;
    const q2 = this.q2;
    for (let i = 0; i < n; i++) {
      const rowI = 2 * i * n;
      for (let j = i; j < n; j++) {
        const rowJ = 2 * j * n;
        let sr = 0;
        let si = 0;
        for (let k = 0; k < 2 * n; k += 2) {
          const ar = q[rowI + k];
          const ai = q[rowI + k + 1];
          const br = q[rowJ + k];
          const bi = q[rowJ + k + 1];
          sr += ar * br + ai * bi;
          si += ai * br - ar * bi;
        }
        q2[rowI + 2 * j] = sr;
        q2[rowI + 2 * j + 1] = i === j ? 0 : si;
      }
    }
  }
}
