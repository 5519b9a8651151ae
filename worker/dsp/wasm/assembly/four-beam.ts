// beam-solves.ts FourBeamSolver on f64x2 lanes: z = L⁻¹v and u = L⁻ᴴz for four look directions
// at once, each complex value in one v128. Layouts as there: lo = L (lower triangle), up = Lᴴ
// (upper triangle), z, u and v4 element-major with the four beams side by side,
// ((i·4 + t)·2 + re|im); norms receives ‖z_t‖² (0…3) and ‖u_t‖² (4…7).
// A complex product L·z is splat(Lr)·z + (−Li, Li)·swap(z).

import { laneSum, swap } from './lanes';

/** From lo (L, lower triangle, already copied in): up = Lᴴ and inv_i = 1/L_ii. */
export function fourBeamFactor(lo: usize, up: usize, inv: usize, n: i32): void {
  const rowB = <usize>n << 4;
  const conj = f64x2(1, -1);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k <= i; k++) {
      const x = v128.load(lo + <usize>i * rowB + (<usize>k << 4));
      v128.store(up + <usize>k * rowB + (<usize>i << 4), f64x2.mul(x, conj));
    }
    store<f64>(inv + (<usize>i << 3), 1 / load<f64>(lo + <usize>i * rowB + (<usize>i << 4)));
  }
}

export function solveFour(lo: usize, up: usize, inv: usize, v4: usize, z: usize, u: usize, norms: usize, n: i32): void {
  const rowB = <usize>n << 4;
  const sign = f64x2(-1, 1);
  let s0 = f64x2.splat(0), s1 = f64x2.splat(0), s2 = f64x2.splat(0), s3 = f64x2.splat(0);
  // Forward: z_i = (v_i − Σ_{k<i} L_ik·z_k) / L_ii.
  for (let i = 0; i < n; i++) {
    const row = lo + <usize>i * rowB;
    let a0 = f64x2.splat(0), a1 = f64x2.splat(0), a2 = f64x2.splat(0), a3 = f64x2.splat(0);
    for (let k = 0; k < i; k++) {
      const l = v128.load(row + (<usize>k << 4));
      const lr = v128.shuffle<f64>(l, l, 0, 0);
      const li = f64x2.mul(v128.shuffle<f64>(l, l, 1, 1), sign);
      const zb = z + (<usize>k << 6);
      const z0 = v128.load(zb), z1 = v128.load(zb + 16), z2 = v128.load(zb + 32), z3 = v128.load(zb + 48);
      a0 = f64x2.add(a0, f64x2.add(f64x2.mul(lr, z0), f64x2.mul(li, swap(z0))));
      a1 = f64x2.add(a1, f64x2.add(f64x2.mul(lr, z1), f64x2.mul(li, swap(z1))));
      a2 = f64x2.add(a2, f64x2.add(f64x2.mul(lr, z2), f64x2.mul(li, swap(z2))));
      a3 = f64x2.add(a3, f64x2.add(f64x2.mul(lr, z3), f64x2.mul(li, swap(z3))));
    }
    const d = f64x2.splat(load<f64>(inv + (<usize>i << 3)));
    const vb = v4 + (<usize>i << 6);
    const zb = z + (<usize>i << 6);
    const e0 = f64x2.mul(f64x2.sub(v128.load(vb), a0), d);
    const e1 = f64x2.mul(f64x2.sub(v128.load(vb + 16), a1), d);
    const e2 = f64x2.mul(f64x2.sub(v128.load(vb + 32), a2), d);
    const e3 = f64x2.mul(f64x2.sub(v128.load(vb + 48), a3), d);
    v128.store(zb, e0);
    v128.store(zb + 16, e1);
    v128.store(zb + 32, e2);
    v128.store(zb + 48, e3);
    s0 = f64x2.add(s0, f64x2.mul(e0, e0));
    s1 = f64x2.add(s1, f64x2.mul(e1, e1));
    s2 = f64x2.add(s2, f64x2.mul(e2, e2));
    s3 = f64x2.add(s3, f64x2.mul(e3, e3));
  }
  store<f64>(norms, laneSum(s0));
  store<f64>(norms + 8, laneSum(s1));
  store<f64>(norms + 16, laneSum(s2));
  store<f64>(norms + 24, laneSum(s3));
  // Back: u_i = (z_i − Σ_{k>i} conj(L_ki)·u_k) / L_ii, with up[i][k] = conj(L_ki).
  let q0 = f64x2.splat(0), q1 = f64x2.splat(0), q2 = f64x2.splat(0), q3 = f64x2.splat(0);
  for (let i = n - 1; i >= 0; i--) {
    const row = up + <usize>i * rowB;
    let a0 = f64x2.splat(0), a1 = f64x2.splat(0), a2 = f64x2.splat(0), a3 = f64x2.splat(0);
    for (let k = i + 1; k < n; k++) {
      const l = v128.load(row + (<usize>k << 4));
      const lr = v128.shuffle<f64>(l, l, 0, 0);
      const li = f64x2.mul(v128.shuffle<f64>(l, l, 1, 1), sign);
      const ub = u + (<usize>k << 6);
      const u0 = v128.load(ub), u1 = v128.load(ub + 16), u2 = v128.load(ub + 32), u3 = v128.load(ub + 48);
      a0 = f64x2.add(a0, f64x2.add(f64x2.mul(lr, u0), f64x2.mul(li, swap(u0))));
      a1 = f64x2.add(a1, f64x2.add(f64x2.mul(lr, u1), f64x2.mul(li, swap(u1))));
      a2 = f64x2.add(a2, f64x2.add(f64x2.mul(lr, u2), f64x2.mul(li, swap(u2))));
      a3 = f64x2.add(a3, f64x2.add(f64x2.mul(lr, u3), f64x2.mul(li, swap(u3))));
    }
    const d = f64x2.splat(load<f64>(inv + (<usize>i << 3)));
    const zb = z + (<usize>i << 6);
    const ub = u + (<usize>i << 6);
    const e0 = f64x2.mul(f64x2.sub(v128.load(zb), a0), d);
    const e1 = f64x2.mul(f64x2.sub(v128.load(zb + 16), a1), d);
    const e2 = f64x2.mul(f64x2.sub(v128.load(zb + 32), a2), d);
    const e3 = f64x2.mul(f64x2.sub(v128.load(zb + 48), a3), d);
    v128.store(ub, e0);
    v128.store(ub + 16, e1);
    v128.store(ub + 32, e2);
    v128.store(ub + 48, e3);
    q0 = f64x2.add(q0, f64x2.mul(e0, e0));
    q1 = f64x2.add(q1, f64x2.mul(e1, e1));
    q2 = f64x2.add(q2, f64x2.mul(e2, e2));
    q3 = f64x2.add(q3, f64x2.mul(e3, e3));
  }
  store<f64>(norms + 32, laneSum(q0));
  store<f64>(norms + 40, laneSum(q1));
  store<f64>(norms + 48, laneSum(q2));
  store<f64>(norms + 56, laneSum(q3));
}
