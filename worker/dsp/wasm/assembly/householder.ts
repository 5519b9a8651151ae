// Householder reduction of a Hermitian matrix to real tridiagonal form, lower triangle only:
// hermitian-eigen.ts HermitianEigenvalues.tridiagonalize, same steps and same two-rows-per-pass
// loops, with the complex multiply-adds of p = A·v and of the rank-2 update on f64x2 lanes.
// Any N. Writes the diagonal to d and the squared off-diagonal moduli to e (for tqlrat).

import { conj, lane0, lane1, swap } from './lanes';

/**
 * a: N×N interleaved (lower triangle used, reduced in place); v, p: 2N doubles of scratch;
 * d, e: N doubles each.
 */
export function tridiagonalize(a: usize, v: usize, p: usize, d: usize, e: usize, n: i32): void {
  const rowB = <usize>n << 4;
  for (let k = 0; k < n - 2; k++) {
    const m0 = k + 1;
    const colK = a + (<usize>k << 4);
    let norm2: f64 = 0;
    for (let i = m0; i < n; i++) {
      const x = v128.load(colK + <usize>i * rowB);
      const sq = f64x2.mul(x, x);
      norm2 += lane0(sq) + lane1(sq);
    }
    store<f64>(d + (<usize>k << 3), load<f64>(colK + <usize>k * rowB));
    const x0r = load<f64>(colK + <usize>m0 * rowB);
    const x0i = load<f64>(colK + <usize>m0 * rowB + 8);
    const x0abs2 = x0r * x0r + x0i * x0i;
    const x0abs = Math.sqrt(x0abs2);
    const norm = Math.sqrt(norm2);
    store<f64>(e + (<usize>k << 3), norm2);
    if (norm2 == 0 || norm2 == x0abs2) continue;
    for (let i = m0; i < n; i++) v128.store(v + (<usize>i << 4), v128.load(colK + <usize>i * rowB));
    const v0 = v + (<usize>m0 << 4);
    if (x0abs > 0) {
      const ph = 1 + norm / x0abs;
      store<f64>(v0, x0r * ph);
      store<f64>(v0 + 8, x0i * ph);
    } else {
      store<f64>(v0, norm);
      store<f64>(v0 + 8, 0);
    }
    let vv: f64 = 0;
    for (let i = m0; i < n; i++) {
      const x = v128.load(v + (<usize>i << 4));
      const sq = f64x2.mul(x, x);
      vv += lane0(sq) + lane1(sq);
    }
    const tau = 2 / vv;
    for (let i = m0; i < n; i++) v128.store(p + (<usize>i << 4), f64x2.splat(0));
    const jStart = <usize>m0 << 4;
    // p = A·v from the lower triangle, two rows per pass:
    //   s_i += A_ij·v_j (row sums), p_j += conj(A_ij)·v_i (the mirrored upper triangle).
    let i = m0;
    for (; i + 1 < n; i += 2) {
      const row = a + <usize>i * rowB;
      const row1 = row + rowB;
      const ib = <usize>i << 4;
      const vi = v128.load(v + ib);
      const wi = v128.load(v + ib + 16);
      // conj(A)·v_i = Ar·(vr, vi) + Ai·(vi, −vr)
      const viS = conj(swap(vi));
      const wiS = conj(swap(wi));
      let sP = f64x2.splat(0), sQ = f64x2.splat(0), tP = f64x2.splat(0), tQ = f64x2.splat(0);
      for (let j = jStart; j < ib; j += 16) {
        const av = v128.load(row + j);
        const bv = v128.load(row1 + j);
        const vj = v128.load(v + j);
        const vjs = swap(vj);
        sP = f64x2.add(sP, f64x2.mul(av, vj));
        sQ = f64x2.add(sQ, f64x2.mul(av, vjs));
        tP = f64x2.add(tP, f64x2.mul(bv, vj));
        tQ = f64x2.add(tQ, f64x2.mul(bv, vjs));
        const ar = v128.shuffle<f64>(av, av, 0, 0);
        const ai = v128.shuffle<f64>(av, av, 1, 1);
        const br = v128.shuffle<f64>(bv, bv, 0, 0);
        const bi = v128.shuffle<f64>(bv, bv, 1, 1);
        const pj = v128.load(p + j);
        v128.store(p + j, f64x2.add(pj, f64x2.add(
          f64x2.add(f64x2.mul(ar, vi), f64x2.mul(ai, viS)),
          f64x2.add(f64x2.mul(br, wi), f64x2.mul(bi, wiS)))));
      }
      const sr = lane0(sP) - lane1(sP);
      const si = lane0(sQ) + lane1(sQ);
      const tr = lane0(tP) - lane1(tP);
      const ti = lane0(tQ) + lane1(tQ);
      const vir = lane0(vi), vii = lane1(vi), wir = lane0(wi), wii = lane1(wi);
      const cr = load<f64>(row1 + ib);
      const ci = load<f64>(row1 + ib + 8);
      const aii = load<f64>(row + ib);
      const bjj = load<f64>(row1 + ib + 16);
      const pi = p + ib;
      store<f64>(pi, load<f64>(pi) + (sr + aii * vir + cr * wir + ci * wii));
      store<f64>(pi + 8, load<f64>(pi + 8) + (si + aii * vii + cr * wii - ci * wir));
      store<f64>(pi + 16, load<f64>(pi + 16) + (tr + cr * vir - ci * vii + bjj * wir));
      store<f64>(pi + 24, load<f64>(pi + 24) + (ti + cr * vii + ci * vir + bjj * wii));
    }
    for (; i < n; i++) {
      const row = a + <usize>i * rowB;
      const ib = <usize>i << 4;
      const vi = v128.load(v + ib);
      const viS = conj(swap(vi));
      let sP = f64x2.splat(0), sQ = f64x2.splat(0);
      for (let j = jStart; j < ib; j += 16) {
        const av = v128.load(row + j);
        const vj = v128.load(v + j);
        sP = f64x2.add(sP, f64x2.mul(av, vj));
        sQ = f64x2.add(sQ, f64x2.mul(av, swap(vj)));
        const ar = v128.shuffle<f64>(av, av, 0, 0);
        const ai = v128.shuffle<f64>(av, av, 1, 1);
        v128.store(p + j, f64x2.add(v128.load(p + j), f64x2.add(f64x2.mul(ar, vi), f64x2.mul(ai, viS))));
      }
      const aii = load<f64>(row + ib);
      const pi = p + ib;
      store<f64>(pi, load<f64>(pi) + (lane0(sP) - lane1(sP) + aii * lane0(vi)));
      store<f64>(pi + 8, load<f64>(pi + 8) + (lane0(sQ) + lane1(sQ) + aii * lane1(vi)));
    }
    // p ← τ·p; Kc = (τ/2)·Re(vᴴp); q = p − Kc·v (in p).
    const tauV = f64x2.splat(tau);
    let kr: f64 = 0;
    for (let i2 = m0; i2 < n; i2++) {
      const at = p + (<usize>i2 << 4);
      const s = f64x2.mul(v128.load(at), tauV);
      v128.store(at, s);
      const prod = f64x2.mul(v128.load(v + (<usize>i2 << 4)), s);
      kr += lane0(prod) + lane1(prod);
    }
    const kc = f64x2.splat(kr * (tau / 2));
    for (let i2 = m0; i2 < n; i2++) {
      const at = p + (<usize>i2 << 4);
      v128.store(at, f64x2.sub(v128.load(at), f64x2.mul(kc, v128.load(v + (<usize>i2 << 4)))));
    }
    // A ← A − v·qᴴ − q·vᴴ on the trailing lower triangle, two rows per pass:
    //   v_r·conj(q_j) + q_r·conj(v_j) = vr·conj(q_j) + vi·swap(q_j) + qr·conj(v_j) + qi·swap(v_j)
    //   with swap(x) = (im, re) and vr, vi, qr, qi the parts of v_r and q_r splat across lanes.
    let r = m0;
    for (; r + 1 < n; r += 2) {
      const row = a + <usize>r * rowB;
      const row1 = row + rowB;
      const rb = <usize>r << 4;
      const vrS = v128.load(v + rb);
      const qrS = v128.load(p + rb);
      const urS = v128.load(v + rb + 16);
      const srS = v128.load(p + rb + 16);
      const vr = f64x2.splat(lane0(vrS)), vi = f64x2.splat(lane1(vrS));
      const qr = f64x2.splat(lane0(qrS)), qi = f64x2.splat(lane1(qrS));
      const ur = f64x2.splat(lane0(urS)), ui = f64x2.splat(lane1(urS));
      const sr = f64x2.splat(lane0(srS)), si = f64x2.splat(lane1(srS));
      for (let j = jStart; j <= rb; j += 16) {
        const qj = v128.load(p + j);
        const vj = v128.load(v + j);
        const qc = conj(qj);
        const qs = swap(qj);
        const vc = conj(vj);
        const vs = swap(vj);
        const at0 = row + j;
        const at1 = row1 + j;
        v128.store(at0, f64x2.sub(v128.load(at0), f64x2.add(
          f64x2.add(f64x2.mul(vr, qc), f64x2.mul(vi, qs)),
          f64x2.add(f64x2.mul(qr, vc), f64x2.mul(qi, vs)))));
        v128.store(at1, f64x2.sub(v128.load(at1), f64x2.add(
          f64x2.add(f64x2.mul(ur, qc), f64x2.mul(ui, qs)),
          f64x2.add(f64x2.mul(sr, vc), f64x2.mul(si, vs)))));
      }
      const dAt = row1 + rb + 16;
      store<f64>(dAt, load<f64>(dAt) - 2 * (lane0(urS) * lane0(srS) + lane1(urS) * lane1(srS)));
      store<f64>(dAt + 8, 0);
    }
    for (; r < n; r++) {
      const row = a + <usize>r * rowB;
      const rb = <usize>r << 4;
      const vrS = v128.load(v + rb);
      const qrS = v128.load(p + rb);
      const vr = f64x2.splat(lane0(vrS)), vi = f64x2.splat(lane1(vrS));
      const qr = f64x2.splat(lane0(qrS)), qi = f64x2.splat(lane1(qrS));
      for (let j = jStart; j <= rb; j += 16) {
        const qj = v128.load(p + j);
        const vj = v128.load(v + j);
        const qc = conj(qj);
        const qs = swap(qj);
        const vc = conj(vj);
        const vs = swap(vj);
        const at0 = row + j;
        v128.store(at0, f64x2.sub(v128.load(at0), f64x2.add(
          f64x2.add(f64x2.mul(vr, qc), f64x2.mul(vi, qs)),
          f64x2.add(f64x2.mul(qr, vc), f64x2.mul(qi, vs)))));
      }
    }
  }
  if (n >= 2) {
    const sub = a + <usize>(n - 1) * rowB + (<usize>(n - 2) << 4);
    store<f64>(d + (<usize>(n - 2) << 3), load<f64>(a + <usize>(n - 2) * rowB + (<usize>(n - 2) << 4)));
    const re = load<f64>(sub);
    const im = load<f64>(sub + 8);
    store<f64>(e + (<usize>(n - 2) << 3), re * re + im * im);
  }
  store<f64>(d + (<usize>(n - 1) << 3), load<f64>(a + <usize>(n - 1) * rowB + (<usize>(n - 1) << 4)));
  store<f64>(e + (<usize>(n - 1) << 3), 0);
}
