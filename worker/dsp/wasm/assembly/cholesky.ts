// Complex Cholesky A + δI = L·Lᴴ (hermitian-cholesky.ts choleskyFactor, same order of
// operations per entry, two rows per pass over the dot products on f64x2 lanes). Reads the lower
// triangle of a; writes the lower triangle of l (the strict upper triangle is not touched).
// Returns 1 when positive definite, 0 when a pivot is at or below floorRel × the largest
// diagonal entry (L is then garbage).

import { lane0, lane1, swap } from './lanes';

export function choleskyFactor(a: usize, l: usize, n: i32, delta: f64, floorRel: f64): i32 {
  const rowB = <usize>n << 4;
  let maxDiag: f64 = 0;
  for (let i = 0; i < n; i++) {
    const d = load<f64>(a + <usize>i * rowB + (<usize>i << 4)) + delta;
    if (d > maxDiag) maxDiag = d;
  }
  if (!(maxDiag > 0) || !isFinite(maxDiag)) return 0;
  const floor = floorRel * maxDiag;
  for (let j = 0; j < n; j++) {
    const rowJ = l + <usize>j * rowB;
    const jb = <usize>j << 4;
    let acc = f64x2.splat(0);
    for (let k: usize = 0; k < jb; k += 16) {
      const x = v128.load(rowJ + k);
      acc = f64x2.add(acc, f64x2.mul(x, x));
    }
    const d = load<f64>(a + <usize>j * rowB + jb) + delta - (lane0(acc) + lane1(acc));
    if (!(d > floor)) return 0;
    const ljj = Math.sqrt(d);
    const inv = 1 / ljj;
    store<f64>(rowJ + jb, ljj);
    store<f64>(rowJ + jb + 8, 0);
    // L_ij = (A_ij − Σ_k L_ik·conj(L_jk)) / L_jj: re from lanes of x·b, im from x·swap(b).
    let i = j + 1;
    for (; i + 1 < n; i += 2) {
      const rowI = l + <usize>i * rowB;
      const rowI1 = rowI + rowB;
      let pP = f64x2.splat(0), pQ = f64x2.splat(0), qP = f64x2.splat(0), qQ = f64x2.splat(0);
      for (let k: usize = 0; k < jb; k += 16) {
        const b = v128.load(rowJ + k);
        const bs = swap(b);
        const x = v128.load(rowI + k);
        const y = v128.load(rowI1 + k);
        pP = f64x2.add(pP, f64x2.mul(x, b));
        pQ = f64x2.add(pQ, f64x2.mul(x, bs));
        qP = f64x2.add(qP, f64x2.mul(y, b));
        qQ = f64x2.add(qQ, f64x2.mul(y, bs));
      }
      const aI = a + <usize>i * rowB + jb;
      const aI1 = aI + rowB;
      store<f64>(rowI + jb, (load<f64>(aI) - (lane0(pP) + lane1(pP))) * inv);
      store<f64>(rowI + jb + 8, (load<f64>(aI + 8) - (lane1(pQ) - lane0(pQ))) * inv);
      store<f64>(rowI1 + jb, (load<f64>(aI1) - (lane0(qP) + lane1(qP))) * inv);
      store<f64>(rowI1 + jb + 8, (load<f64>(aI1 + 8) - (lane1(qQ) - lane0(qQ))) * inv);
    }
    if (i < n) {
      const rowI = l + <usize>i * rowB;
      let pP = f64x2.splat(0), pQ = f64x2.splat(0);
      for (let k: usize = 0; k < jb; k += 16) {
        const b = v128.load(rowJ + k);
        const x = v128.load(rowI + k);
        pP = f64x2.add(pP, f64x2.mul(x, b));
        pQ = f64x2.add(pQ, f64x2.mul(x, swap(b)));
      }
      const aI = a + <usize>i * rowB + jb;
      store<f64>(rowI + jb, (load<f64>(aI) - (lane0(pP) + lane1(pP))) * inv);
      store<f64>(rowI + jb + 8, (load<f64>(aI + 8) - (lane1(pQ) - lane0(pQ))) * inv);
    }
  }
  return 1;
}
