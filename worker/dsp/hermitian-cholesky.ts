/**
 * Complex Cholesky factorization A = L·Lᴴ of a Hermitian positive-definite N×N matrix and the
 * two triangular solves, on flat interleaved (re, im) row-major Float64Arrays. Own code rather
 * than ml-matrix/mathjs: neither has a complex Cholesky, and ours writes into caller-owned
 * buffers with no allocation, which the per-(bin, window) hot path needs.
 * Element (i, j) of an N×N complex matrix lives at 2·(i·N + j) (re) and +1 (im).
 */

/**
 * Pivots at or below this fraction of the largest diagonal entry count as "not positive
 * definite": the matrix is singular to working precision (condition ≳ 1e13) and any weights
 * made from it would be noise. Common practice for a rank-revealing Cholesky threshold.
 */
export const PIVOT_RELATIVE_FLOOR = 1e-13;

/**
 * Factors A + δI into L (lower triangle written; the strict upper triangle of L is left
 * untouched and never read). Reads only the lower triangle of A (starting at aOff). Returns false when the
 * matrix is not (numerically) positive definite; L is then garbage.
 */
export function choleskyFactor(l: Float64Array, a: Float64Array, n: number, delta = 0, aOff = 0): boolean {
  let maxDiag = 0;
  for (let i = 0; i < n; i++) {
    const d = a[aOff + 2 * (i * n + i)] + delta;
    if (d > maxDiag) maxDiag = d;
  }
  if (!(maxDiag > 0) || !Number.isFinite(maxDiag)) return false;
  const floor = PIVOT_RELATIVE_FLOOR * maxDiag;
  for (let j = 0; j < n; j++) {
    const rowJ = 2 * j * n;
    let d = a[aOff + rowJ + 2 * j] + delta;
    for (let k = 0; k < j; k++) {
      const re = l[rowJ + 2 * k];
      const im = l[rowJ + 2 * k + 1];
      d -= re * re + im * im;
    }
    if (!(d > floor)) return false;
    const ljj = Math.sqrt(d);
    const inv = 1 / ljj;
    l[rowJ + 2 * j] = ljj;
    l[rowJ + 2 * j + 1] = 0;
    for (let i = j + 1; i < n; i++) {
      const rowI = 2 * i * n;
      // L_ij = (A_ij − Σ_k L_ik·conj(L_jk)) / L_jj
      let sr = a[aOff + rowI + 2 * j];
      let si = a[aOff + rowI + 2 * j + 1];
      for (let k = 0; k < j; k++) {
        const ar = l[rowI + 2 * k];
        const ai = l[rowI + 2 * k + 1];
        const br = l[rowJ + 2 * k];
        const bi = l[rowJ + 2 * k + 1];
        sr -= ar * br + ai * bi;
        si -= ai * br - ar * bi;
      }
      l[rowI + 2 * j] = sr * inv;
      l[rowI + 2 * j + 1] = si * inv;
    }
  }
  return true;
}

/** Solves L·z = b (forward substitution); z and b may be the same buffer. Offsets in doubles. */
export function solveLower(z: Float64Array, zOff: number, l: Float64Array, b: Float64Array, bOff: number, n: number): void {
  for (let i = 0; i < n; i++) {
    const row = 2 * i * n;
    let sr = b[bOff + 2 * i];
    let si = b[bOff + 2 * i + 1];
    for (let k = 0; k < i; k++) {
      const lr = l[row + 2 * k];
      const li = l[row + 2 * k + 1];
      const zr = z[zOff + 2 * k];
      const zi = z[zOff + 2 * k + 1];
      sr -= lr * zr - li * zi;
      si -= lr * zi + li * zr;
    }
    const inv = 1 / l[row + 2 * i];
    z[zOff + 2 * i] = sr * inv;
    z[zOff + 2 * i + 1] = si * inv;
  }
}

/**
 * Solves Lᴴ·x = z in place (back substitution, column-oriented so that L is read row by row).
 */
export function solveUpperConjInPlace(x: Float64Array, xOff: number, l: Float64Array, n: number): void {
  for (let i = n - 1; i >= 0; i--) {
    const row = 2 * i * n;
    const inv = 1 / l[row + 2 * i];
    const xr = x[xOff + 2 * i] * inv;
    const xi = x[xOff + 2 * i + 1] * inv;
    x[xOff + 2 * i] = xr;
    x[xOff + 2 * i + 1] = xi;
    // x_k −= conj(L_ik)·x_i for k < i
    for (let k = 0; k < i; k++) {
      const lr = l[row + 2 * k];
      const li = l[row + 2 * k + 1];
      x[xOff + 2 * k] -= lr * xr + li * xi;
      x[xOff + 2 * k + 1] -= lr * xi - li * xr;
    }
  }
}

/** Solves (L·Lᴴ)·x = b: x = A⁻¹b without ever forming A⁻¹. */
export function choleskySolve(x: Float64Array, l: Float64Array, b: Float64Array, n: number): void {
  solveLower(x, 0, l, b, 0, n);
  solveUpperConjInPlace(x, 0, l, n);
}
