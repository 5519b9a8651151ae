/**
 * Eigenvalues of a complex Hermitian N×N matrix: Householder reduction to a Hermitian
 * tridiagonal matrix (the off-diagonal moduli give an equivalent real symmetric tridiagonal,
 * since a diagonal unitary similarity removes their phases), then square-root-free rational QL
 * on that real tridiagonal (tqlrat below). About (4/3)·N³ complex operations.
 * Own code: ml-matrix and mathjs have no complex Hermitian eigensolver that works in place.
 * Storage: flat interleaved (re, im) row-major, as hermitian-cholesky.ts.
 *
 * The Householder reduction runs on the SIMD kernel (wasm/assembly/householder.ts, the same
 * steps) when the kernels are built; the method below stays as the reference
 * (tests/dsp/simd-kernels.test.ts) and the fallback. The work arrays are then views of that
 * kernel instance's memory.
 */
import { instantiateKernels, kernelView, type KernelExports } from './wasm/simd-kernels.js';

export class HermitianEigenvalues {
  readonly n: number;
  private readonly work: Float64Array; // copy of A, reduced in place
  private readonly v: Float64Array; // Householder vector
  private readonly p: Float64Array; // τ·A·v
  private readonly d: Float64Array; // tridiagonal diagonal
  private readonly e: Float64Array; // squared moduli of the tridiagonal off-diagonal
  private readonly kernels: KernelExports | null;
  /** Byte offsets of work, v, p, d, e in the kernel instance's memory (SIMD path). */
  private readonly at: { work: number; v: number; p: number; d: number; e: number };

  constructor(n: number, useSimd = true) {
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`matrix order must be a positive integer, got ${n}`);
    this.n = n;
    const m = 2 * n * n;
    const at = (this.at = { work: 0, v: 8 * m, p: 8 * (m + 2 * n), d: 8 * (m + 4 * n), e: 8 * (m + 5 * n) });
    const kernels = useSimd ? instantiateKernels(8 * (m + 6 * n)) : null;
    this.kernels = kernels;
    if (kernels) {
      this.work = kernelView(kernels, at.work, m);
      this.v = kernelView(kernels, at.v, 2 * n);
      this.p = kernelView(kernels, at.p, 2 * n);
      this.d = kernelView(kernels, at.d, n);
      this.e = kernelView(kernels, at.e, n);
    } else {
      this.work = new Float64Array(m);
      this.v = new Float64Array(2 * n);
      this.p = new Float64Array(2 * n);
      this.d = new Float64Array(n);
      this.e = new Float64Array(n);
    }
  }

  /**
   * Writes the N eigenvalues of Hermitian `a` (read at offset aOff) into out[outOff…],
   * sorted in descending order. Uses only the lower triangle of a. Returns false if the QL
   * iteration failed to converge (never seen for finite input; outputs are then NaN).
   */
  run(out: Float64Array, outOff: number, a: Float64Array, aOff = 0): boolean {
    const n = this.n;
    const w = this.work;
    // Copy the lower triangle: the reduction reads and writes only that half.
    for (let i = 0; i < n; i++) {
      const row = 2 * i * n;
      for (let j = 0; j <= i; j++) {
        w[row + 2 * j] = a[aOff + row + 2 * j];
        w[row + 2 * j + 1] = a[aOff + row + 2 * j + 1];
      }
    }
    const kernels = this.kernels;
    if (kernels) {
      const at = this.at;
      kernels.tridiagonalize(at.work, at.v, at.p, at.d, at.e, n);
    } else {
      this.tridiagonalize();
    }
    const ok = tqlrat(this.d, this.e, n);
    if (!ok) {
      for (let i = 0; i < n; i++) out[outOff + i] = NaN;
      return false;
    }
    const d = this.d;
    // tqlrat leaves them ascending; callers want descending.
    for (let i = 0; i < n; i++) out[outOff + i] = d[n - 1 - i];
    return true;
  }

  /**
   * Householder reduction working on the lower triangle only (the upper is never read): the
   * product p = τ·A·v visits each stored element once and uses it for both A_ij·v_j and
   * conj(A_ij)·v_i, and the rank-2 update writes only j ≤ i. Half the memory traffic of a
   * full-matrix reduction and no strided column writes; bench/dsp-engine.ts "eigenvalues"
   * gave 282 µs CPU per window-bin for the former full-matrix form.
   */
  private tridiagonalize(): void {
    const n = this.n;
    const a = this.work;
    const v = this.v;
    const p = this.p;
    const d = this.d;
    const e = this.e;
    for (let k = 0; k < n - 2; k++) {
      // x = A[k+1…n−1, k]
      const m0 = k + 1;
      let norm2 = 0;
      for (let i = m0; i < n; i++) {
        const re = a[2 * (i * n + k)];
        const im = a[2 * (i * n + k) + 1];
        norm2 += re * re + im * im;
      }
      d[k] = a[2 * (k * n + k)];
      const x0r = a[2 * (m0 * n + k)];
      const x0i = a[2 * (m0 * n + k) + 1];
      const x0abs2 = x0r * x0r + x0i * x0i;
      const x0abs = Math.sqrt(x0abs2);
      const norm = Math.sqrt(norm2);
      e[k] = norm2; // tqlrat works on squared off-diagonals: no square root needed here
      if (norm2 === 0 || norm2 === x0abs2) {
        // Column already reduced (x ∝ e1): no reflection needed.
        continue;
      }
      // α = −e^{j·arg x0}·‖x‖; v = x − α·e1 so v0 = x0·(1 + ‖x‖/|x0|).
      for (let i = m0; i < n; i++) {
        v[2 * i] = a[2 * (i * n + k)];
        v[2 * i + 1] = a[2 * (i * n + k) + 1];
      }
      if (x0abs > 0) {
        const ph = 1 + norm / x0abs;
        v[2 * m0] = x0r * ph;
        v[2 * m0 + 1] = x0i * ph;
      } else {
        v[2 * m0] = norm;
        v[2 * m0 + 1] = 0;
      }
      let vv = 0;
      for (let i = m0; i < n; i++) vv += v[2 * i] * v[2 * i] + v[2 * i + 1] * v[2 * i + 1];
      const tau = 2 / vv;
      // p = A·v over the trailing block from its lower triangle (A_ji = conj(A_ij)).
      for (let i = m0; i < n; i++) {
        p[2 * i] = 0;
        p[2 * i + 1] = 0;
      }
      // Two rows per pass (bench/dsp-engine.ts "eigenvalues": each loaded v_j and p_j serves both
      // rows; the odd row left over goes alone).
      let i = m0;
      for (; i + 1 < n; i += 2) {
        const row = 2 * i * n;
        const row1 = row + 2 * n;
        const vir = v[2 * i];
        const vii = v[2 * i + 1];
        const wir = v[2 * i + 2];
        const wii = v[2 * i + 3];
        let sr = 0;
        let si = 0;
        let tr = 0;
        let ti = 0;
        for (let j = m0; j < i; j++) {
          const ar = a[row + 2 * j];
          const ai = a[row + 2 * j + 1];
          const br = a[row1 + 2 * j];
          const bi = a[row1 + 2 * j + 1];
          const vjr = v[2 * j];
          const vji = v[2 * j + 1];
          sr += ar * vjr - ai * vji;
          si += ar * vji + ai * vjr;
          tr += br * vjr - bi * vji;
          ti += br * vji + bi * vjr;
          p[2 * j] += ar * vir + ai * vii + br * wir + bi * wii;
          p[2 * j + 1] += ar * vii - ai * vir + br * wii - bi * wir;
        }
        // Element (i+1, i) and the two diagonals.
        const cr = a[row1 + 2 * i];
        const ci = a[row1 + 2 * i + 1];
        const aii = a[row + 2 * i];
        const bjj = a[row1 + 2 * i + 2];
        p[2 * i] += sr + aii * vir + cr * wir + ci * wii;
        p[2 * i + 1] += si + aii * vii + cr * wii - ci * wir;
        p[2 * i + 2] += tr + cr * vir - ci * vii + bjj * wir;
        p[2 * i + 3] += ti + cr * vii + ci * vir + bjj * wii;
      }
      for (; i < n; i++) {
        const row = 2 * i * n;
        const vir = v[2 * i];
        const vii = v[2 * i + 1];
        let sr = 0;
        let si = 0;
        for (let j = m0; j < i; j++) {
          const ar = a[row + 2 * j];
          const ai = a[row + 2 * j + 1];
          const vjr = v[2 * j];
          const vji = v[2 * j + 1];
          sr += ar * vjr - ai * vji;
          si += ar * vji + ai * vjr;
          p[2 * j] += ar * vir + ai * vii;
          p[2 * j + 1] += ar * vii - ai * vir;
        }
        const aii = a[row + 2 * i];
        p[2 * i] += sr + aii * vir;
        p[2 * i + 1] += si + aii * vii;
      }
      // p ← τ·p; Kc = (τ/2)·vᴴp (real for Hermitian A).
      let kr = 0;
      for (let i = m0; i < n; i++) {
        const sr = p[2 * i] * tau;
        const si = p[2 * i + 1] * tau;
        p[2 * i] = sr;
        p[2 * i + 1] = si;
        kr += v[2 * i] * sr + v[2 * i + 1] * si; // Re(conj(v_i)·p_i)
      }
      kr *= tau / 2;
      // q = p − Kc·v (stored in p); A ← A − v·qᴴ − q·vᴴ on the trailing lower triangle.
      for (let i = m0; i < n; i++) {
        p[2 * i] -= kr * v[2 * i];
        p[2 * i + 1] -= kr * v[2 * i + 1];
      }
      // Two rows per pass, sharing the loads of v_j and q_j.
      let r = m0;
      for (; r + 1 < n; r += 2) {
        const row = 2 * r * n;
        const row1 = row + 2 * n;
        const vr = v[2 * r];
        const vi = v[2 * r + 1];
        const qr = p[2 * r];
        const qi = p[2 * r + 1];
        const ur = v[2 * r + 2];
        const ui = v[2 * r + 3];
        const sr = p[2 * r + 2];
        const si = p[2 * r + 3];
        for (let j = m0; j <= r; j++) {
          const qjr = p[2 * j];
          const qji = p[2 * j + 1];
          const vjr = v[2 * j];
          const vji = v[2 * j + 1];
          // v_i·conj(q_j) + q_i·conj(v_j)
          a[row + 2 * j] -= vr * qjr + vi * qji + qr * vjr + qi * vji;
          a[row + 2 * j + 1] -= vi * qjr - vr * qji + qi * vjr - qr * vji;
          a[row1 + 2 * j] -= ur * qjr + ui * qji + sr * vjr + si * vji;
          a[row1 + 2 * j + 1] -= ui * qjr - ur * qji + si * vjr - sr * vji;
        }
        // Diagonal of row r + 1 (j = r + 1).
        a[row1 + 2 * r + 2] -= 2 * (ur * sr + ui * si);
        a[row1 + 2 * r + 3] = 0;
      }
      for (; r < n; r++) {
        const row = 2 * r * n;
        const vr = v[2 * r];
        const vi = v[2 * r + 1];
        const qr = p[2 * r];
        const qi = p[2 * r + 1];
        for (let j = m0; j <= r; j++) {
          const qjr = p[2 * j];
          const qji = p[2 * j + 1];
          const vjr = v[2 * j];
          const vji = v[2 * j + 1];
          a[row + 2 * j] -= vr * qjr + vi * qji + qr * vjr + qi * vji;
          a[row + 2 * j + 1] -= vi * qjr - vr * qji + qi * vjr - qr * vji;
        }
      }
    }
    if (n >= 2) {
      d[n - 2] = a[2 * ((n - 2) * n + n - 2)];
      const r = a[2 * ((n - 1) * n + n - 2)];
      const i = a[2 * ((n - 1) * n + n - 2) + 1];
      e[n - 2] = r * r + i * i;
    }
    d[n - 1] = a[2 * ((n - 1) * n + n - 1)];
    e[n - 1] = 0;
  }
}

/**
 * √(a² + b²) without overflow or destructive underflow (the classic form, Numerical Recipes
 * §2.6 "pythag"). Used instead of Math.hypot, which V8 does not inline and which dominated the
 * QL sweep in bench/dsp-engine.ts; now only the shift of each QL step needs it.
 */
function pythag(x: number, y: number): number {
  const a = Math.abs(x);
  const b = Math.abs(y);
  if (a > b) {
    const r = b / a;
    return a * Math.sqrt(1 + r * r);
  }
  if (b === 0) return 0;
  const r = a / b;
  return b * Math.sqrt(1 + r * r);
}

/**
 * Square-root-free ("rational") QL for the eigenvalues of a real symmetric tridiagonal matrix
 * (Reinsch 1973, CACM Algorithm 464; EISPACK TQLRAT, Smith et al. 1976 — transcribed from the
 * published EISPACK routine as recalled from memory, checked against a closed form and mathjs in
 * tests/dsp). d: diagonal; e2: squared sub-diagonal in e2[0…n−2]. Eigenvalues are left in d in
 * ascending order. Why: the former implicit QL with Givens rotations (tql1: Bowdler,
 * Martin, Reinsch & Wilkinson 1968) took ≈ 35–41 of 128 µs per 32×32 eigenvalue call, one
 * pythag (square root, division) per rotation; this form ≈ 17 µs (bench/dsp-engine.ts).
 */
export function tqlrat(d: Float64Array, e2: Float64Array, n: number): boolean {
  if (n === 1) return true;
  e2[n - 1] = 0;
  let f = 0;
  let t = 0;
  let b = 0;
  let c = 0;
  for (let l = 0; l < n; l++) {
    let h = Math.abs(d[l]) + Math.sqrt(e2[l]);
    if (t <= h) {
      t = h;
      b = Number.EPSILON * t;
      c = b * b;
    }
    // Look for a negligible squared sub-diagonal element (e2[n−1] = 0 ends the search).
    let m = l;
    while (e2[m] > c) m++;
    if (m !== l) {
      let iter = 0;
      for (;;) {
        if (++iter > 60) return false;
        // Shift from the leading 2×2 block.
        const l1 = l + 1;
        let s = Math.sqrt(e2[l]);
        let g = d[l];
        let p = (d[l1] - g) / (2 * s);
        let r = pythag(p, 1);
        d[l] = s / (p + (p >= 0 ? r : -r));
        h = g - d[l];
        for (let i = l1; i < n; i++) d[i] -= h;
        f += h;
        // Rational QL sweep.
        g = d[m];
        if (g === 0) g = b;
        h = g;
        s = 0;
        for (let i = m - 1; i >= l; i--) {
          p = g * h;
          r = p + e2[i];
          e2[i + 1] = s * r;
          s = e2[i] / r;
          d[i + 1] = h + s * (h + d[i]);
          g = d[i] - e2[i] / g;
          if (g === 0) g = b;
          h = (g * p) / r;
        }
        e2[l] = s * g;
        d[l] = h;
        // Guard against underflow in the convergence test.
        if (h === 0) break;
        if (Math.abs(e2[l]) <= Math.abs(c / h)) break;
        e2[l] = h * e2[l];
        if (e2[l] === 0) break;
      }
    }
    // Insert the converged eigenvalue into the ascending prefix d[0…l].
    const p = d[l] + f;
    let i = l;
    for (; i > 0; i--) {
      if (p >= d[i - 1]) break;
      d[i] = d[i - 1];
    }
    d[i] = p;
  }
  return true;
}
