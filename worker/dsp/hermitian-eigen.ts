/**
 * Eigenvalues of a complex Hermitian N×N matrix: Householder reduction to a Hermitian
 * tridiagonal matrix (the off-diagonal moduli give an equivalent real symmetric tridiagonal,
 * since a diagonal unitary similarity removes their phases), then implicit QL with Wilkinson
 * shifts on that real tridiagonal (the tql1 / tqli scheme: Bowdler, Martin, Reinsch &
 * Wilkinson 1968; Press et al., Numerical Recipes §11.3). About (4/3)·N³ complex operations.
 * Own code: ml-matrix and mathjs have no complex Hermitian eigensolver that works in place.
 * Storage: flat interleaved (re, im) row-major, as hermitian-cholesky.ts.
 */

export class HermitianEigenvalues {
  readonly n: number;
  private readonly work: Float64Array; // copy of A, reduced in place
  private readonly v: Float64Array; // Householder vector
  private readonly p: Float64Array; // τ·A·v
  private readonly d: Float64Array; // tridiagonal diagonal
  private readonly e: Float64Array; // tridiagonal off-diagonal moduli

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`matrix order must be a positive integer, got ${n}`);
    this.n = n;
    this.work = new Float64Array(2 * n * n);
    this.v = new Float64Array(2 * n);
    this.p = new Float64Array(2 * n);
    this.d = new Float64Array(n);
    this.e = new Float64Array(n);
  }

  /**
   * Writes the N eigenvalues of Hermitian `a` (read at offset aOff) into out[outOff…],
   * sorted in descending order. Uses only the lower triangle of a. Returns false if the QL
   * iteration failed to converge (never seen for finite input; outputs are then NaN).
   */
  run(out: Float64Array, outOff: number, a: Float64Array, aOff = 0): boolean {
    const n = this.n;
    const w = this.work;
    // Copy the lower triangle and mirror it so the reduction can read full rows.
    for (let i = 0; i < n; i++) {
      for (let j = 0; j <= i; j++) {
        const s = aOff + 2 * (i * n + j);
        const re = a[s];
        const im = a[s + 1];
        w[2 * (i * n + j)] = re;
        w[2 * (i * n + j) + 1] = im;
        w[2 * (j * n + i)] = re;
        w[2 * (j * n + i) + 1] = -im;
      }
    }
    this.tridiagonalize();
    const ok = tql1(this.d, this.e, n);
    if (!ok) {
      for (let i = 0; i < n; i++) out[outOff + i] = NaN;
      return false;
    }
    const d = this.d;
    // Insertion sort, descending (N is small; no allocation).
    for (let i = 1; i < n; i++) {
      const x = d[i];
      let j = i - 1;
      while (j >= 0 && d[j] < x) {
        d[j + 1] = d[j];
        j--;
      }
      d[j + 1] = x;
    }
    for (let i = 0; i < n; i++) out[outOff + i] = d[i];
    return true;
  }

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
      const x0abs = Math.hypot(x0r, x0i);
      const norm = Math.sqrt(norm2);
      e[k] = norm;
      if (norm2 === 0 || norm2 === x0abs * x0abs) {
        // Column already reduced (x ∝ e1): no reflection needed.
        continue;
      }
      // α = −e^{j·arg x0}·‖x‖; v = x − α·e1 so v0 = x0·(1 + ‖x‖/|x0|).
      const ph = x0abs > 0 ? 1 + norm / x0abs : 1;
      for (let i = m0; i < n; i++) {
        v[2 * i] = a[2 * (i * n + k)];
        v[2 * i + 1] = a[2 * (i * n + k) + 1];
      }
      if (x0abs > 0) {
        v[2 * m0] = x0r * ph;
        v[2 * m0 + 1] = x0i * ph;
      } else {
        v[2 * m0] = norm;
        v[2 * m0 + 1] = 0;
      }
      let vv = 0;
      for (let i = m0; i < n; i++) vv += v[2 * i] * v[2 * i] + v[2 * i + 1] * v[2 * i + 1];
      const tau = 2 / vv;
      // p = τ·A·v over the trailing block; Kc = (τ/2)·vᴴp (real for Hermitian A).
      let kr = 0;
      for (let i = m0; i < n; i++) {
        let sr = 0;
        let si = 0;
        const row = 2 * i * n;
        for (let j = m0; j < n; j++) {
          const ar = a[row + 2 * j];
          const ai = a[row + 2 * j + 1];
          const vr = v[2 * j];
          const vi = v[2 * j + 1];
          sr += ar * vr - ai * vi;
          si += ar * vi + ai * vr;
        }
        sr *= tau;
        si *= tau;
        p[2 * i] = sr;
        p[2 * i + 1] = si;
        kr += v[2 * i] * sr + v[2 * i + 1] * si; // Re(conj(v_i)·p_i)
      }
      kr *= tau / 2;
      // q = p − Kc·v (stored in p); A ← A − v·qᴴ − q·vᴴ on the trailing block.
      for (let i = m0; i < n; i++) {
        p[2 * i] -= kr * v[2 * i];
        p[2 * i + 1] -= kr * v[2 * i + 1];
      }
      for (let i = m0; i < n; i++) {
        const row = 2 * i * n;
        const vr = v[2 * i];
        const vi = v[2 * i + 1];
        const qr = p[2 * i];
        const qi = p[2 * i + 1];
        for (let j = m0; j <= i; j++) {
          const qjr = p[2 * j];
          const qji = p[2 * j + 1];
          const vjr = v[2 * j];
          const vji = v[2 * j + 1];
          // v_i·conj(q_j) + q_i·conj(v_j)
          const ur = vr * qjr + vi * qji + qr * vjr + qi * vji;
          const ui = vi * qjr - vr * qji + qi * vjr - qr * vji;
          const re = a[row + 2 * j] - ur;
          const im = a[row + 2 * j + 1] - ui;
          a[row + 2 * j] = re;
          a[row + 2 * j + 1] = im;
          a[2 * (j * n + i)] = re;
          a[2 * (j * n + i) + 1] = -im;
        }
      }
    }
    if (n >= 2) {
      d[n - 2] = a[2 * ((n - 2) * n + n - 2)];
      e[n - 2] = Math.hypot(a[2 * ((n - 1) * n + n - 2)], a[2 * ((n - 1) * n + n - 2) + 1]);
    }
    d[n - 1] = a[2 * ((n - 1) * n + n - 1)];
    e[n - 1] = 0;
  }
}

/**
 * Implicit QL with Wilkinson shifts on a real symmetric tridiagonal matrix, eigenvalues only
 * (d: diagonal, e: sub-diagonal in e[0…n−2]; both overwritten, eigenvalues left in d).
 */
function tql1(d: Float64Array, e: Float64Array, n: number): boolean {
  for (let l = 0; l < n; l++) {
    let iter = 0;
    for (;;) {
      let m = l;
      for (; m < n - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= Number.EPSILON * dd) break;
      }
      if (m === l) break;
      if (++iter > 60) return false;
      let g = (d[l + 1] - d[l]) / (2 * e[l]);
      let r = Math.hypot(g, 1);
      g = d[m] - d[l] + e[l] / (g + (g >= 0 ? Math.abs(r) : -Math.abs(r)));
      let s = 1;
      let c = 1;
      let p = 0;
      let i = m - 1;
      for (; i >= l; i--) {
        let f = s * e[i];
        const b = c * e[i];
        r = Math.hypot(f, g);
        e[i + 1] = r;
        if (r === 0) {
          d[i + 1] -= p;
          e[m] = 0;
          break;
        }
        s = f / r;
        c = g / r;
        g = d[i + 1] - p;
        r = (d[i] - g) * s + 2 * c * b;
        p = s * r;
        d[i + 1] = g + p;
        g = c * r - b;
        f = 0;
      }
      if (r === 0 && i >= l) continue;
      d[l] -= p;
      e[l] = g;
      e[m] = 0;
    }
  }
  return true;
}
