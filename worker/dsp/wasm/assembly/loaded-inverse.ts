// The three products of loaded-inverse.ts (LoadedInverse.fromFactor) for even N, same loops
// and same 2×2 tiling; the complex multiply-adds run on f64x2 lanes. For a complex x = (xr, xi)
// and c = (cr, ci) in one v128 each:
//   x·c          lanes (xr·cr, xi·ci)   → re of x·conj(c) is lane0 + lane1, of x·c lane0 − lane1
//   x·swap(c)    lanes (xr·ci, xi·cr)   → im of conj(x)·c is lane0 − lane1, of x·c lane0 + lane1

import { lane0, lane1, swap } from './lanes';

/**
 * X = L⁻¹ column by column, stored transposed: row j of t holds column j of X (entries at and
 * after the diagonal). X_jj = 1/L_jj, X_ij = −(Σ_{k=j}^{i−1} L_ik·X_kj)/L_ii, two columns per pass.
 */
export function invertLower(l: usize, t: usize, n: i32): void {
  const rowB = <usize>n << 4;
  for (let j = 0; j < n; j += 2) {
    const rA = t + <usize>j * rowB;
    const rB = rA + rowB;
    const jb = <usize>j << 4;
    const lB = l + <usize>(j + 1) * rowB;
    const xjj = 1 / load<f64>(l + <usize>j * rowB + jb);
    const d1 = 1 / load<f64>(lB + jb + 16);
    store<f64>(rA + jb, xjj);
    store<f64>(rA + jb + 8, 0);
    store<f64>(rA + jb + 16, -(load<f64>(lB + jb) * xjj) * d1);
    store<f64>(rA + jb + 24, -(load<f64>(lB + jb + 8) * xjj) * d1);
    store<f64>(rB + jb, 0);
    store<f64>(rB + jb + 8, 0);
    store<f64>(rB + jb + 16, d1);
    store<f64>(rB + jb + 24, 0);
    for (let i = j + 2; i < n; i++) {
      const rL = l + <usize>i * rowB;
      const ib = <usize>i << 4;
      let ap = f64x2.splat(0), aq = f64x2.splat(0), bp = f64x2.splat(0), bq = f64x2.splat(0);
      for (let k = jb; k < ib; k += 16) {
        const lv = v128.load(rL + k);
        const ls = swap(lv);
        const x = v128.load(rA + k);
        const y = v128.load(rB + k);
        ap = f64x2.add(ap, f64x2.mul(lv, x));
        aq = f64x2.add(aq, f64x2.mul(ls, x));
        bp = f64x2.add(bp, f64x2.mul(lv, y));
        bq = f64x2.add(bq, f64x2.mul(ls, y));
      }
      const d = -1 / load<f64>(rL + ib);
      store<f64>(rA + ib, (lane0(ap) - lane1(ap)) * d);
      store<f64>(rA + ib + 8, (lane0(aq) + lane1(aq)) * d);
      store<f64>(rB + ib, (lane0(bp) - lane1(bp)) * d);
      store<f64>(rB + ib + 8, (lane0(bq) + lane1(bq)) * d);
    }
  }
}

/**
 * Q = XᴴX from t (Xᵀ, as invertLower writes it): Q_ij = Σ_{k≥j} conj(Xᵀ_ik)·Xᵀ_jk for i ≤ j,
 * then the lower triangle mirrored by conjugation.
 */
export function gramOfInverse(t: usize, q: usize, n: i32): void {
  const rowB = <usize>n << 4;
  for (let i = 0; i < n; i += 2) {
    for (let j = i; j < n; j += 2) {
      // conj(x)·c: im = lane0 − lane1 of x·swap(c); rows of Xᵀ are zero before their diagonal.
      rowPairProducts(t, q, rowB, i, j, <usize>j << 4, 1);
    }
  }
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      const up = q + <usize>a * rowB + (<usize>b << 4);
      const lo = q + <usize>b * rowB + (<usize>a << 4);
      store<f64>(lo, load<f64>(up));
      store<f64>(lo + 8, -load<f64>(up + 8));
    }
  }
}

/**
 * Upper triangle of Q² for Hermitian Q: (Q²)_ij = Σ_k Q_ik·conj(Q_jk), i ≤ j, rows two by two.
 * The strict lower triangle of q2 is not written.
 */
export function squareOfHermitian(q: usize, q2: usize, n: i32): void {
  const rowB = <usize>n << 4;
  for (let i = 0; i < n; i += 2) {
    for (let j = i; j < n; j += 2) {
      // x·conj(c): im = lane1 − lane0 of x·swap(c).
      rowPairProducts(q, q2, rowB, i, j, 0, -1);
    }
  }
}

/**
 * The 2×2 tile (i, i+1) × (j, j+1) of the row products Σ_k x_k·conj(c_k) (re) with the imaginary
 * part imSign·(lane0 − lane1) of Σ x·swap(c), over byte columns [from, rowB) of rows of `src`,
 * written to `dst`; on a diagonal tile (i = j) the entry below the diagonal is left alone and the
 * diagonal's imaginary parts are written as 0. Shared by gramOfInverse (imSign 1) and
 * squareOfHermitian (imSign −1): the same terms, conjugated.
 */
// @ts-ignore: decorator
@inline function rowPairProducts(src: usize, dst: usize, rowB: usize, i: i32, j: i32, from: usize, imSign: f64): void {
  const rI = src + <usize>i * rowB;
  const rI1 = rI + rowB;
  const rJ = src + <usize>j * rowB;
  const rJ1 = rJ + rowB;
  let aap = f64x2.splat(0), aaq = f64x2.splat(0), abp = f64x2.splat(0), abq = f64x2.splat(0);
  let bap = f64x2.splat(0), baq = f64x2.splat(0), bbp = f64x2.splat(0), bbq = f64x2.splat(0);
  for (let k = from; k < rowB; k += 16) {
    const x = v128.load(rI + k);
    const y = v128.load(rI1 + k);
    const c = v128.load(rJ + k);
    const d = v128.load(rJ1 + k);
    const cs = swap(c);
    const ds = swap(d);
    aap = f64x2.add(aap, f64x2.mul(x, c));
    aaq = f64x2.add(aaq, f64x2.mul(x, cs));
    abp = f64x2.add(abp, f64x2.mul(x, d));
    abq = f64x2.add(abq, f64x2.mul(x, ds));
    bap = f64x2.add(bap, f64x2.mul(y, c));
    baq = f64x2.add(baq, f64x2.mul(y, cs));
    bbp = f64x2.add(bbp, f64x2.mul(y, d));
    bbq = f64x2.add(bbq, f64x2.mul(y, ds));
  }
  const oI = dst + <usize>i * rowB + (<usize>j << 4);
  const oI1 = oI + rowB;
  const diag = i == j;
  store<f64>(oI, lane0(aap) + lane1(aap));
  store<f64>(oI + 8, diag ? 0 : imSign * (lane0(aaq) - lane1(aaq)));
  store<f64>(oI + 16, lane0(abp) + lane1(abp));
  store<f64>(oI + 24, imSign * (lane0(abq) - lane1(abq)));
  if (!diag) {
    store<f64>(oI1, lane0(bap) + lane1(bap));
    store<f64>(oI1 + 8, imSign * (lane0(baq) - lane1(baq)));
  }
  store<f64>(oI1 + 16, lane0(bbp) + lane1(bbp));
  store<f64>(oI1 + 24, diag ? 0 : imSign * (lane0(bbq) - lane1(bbq)));
}
