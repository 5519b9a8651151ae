// Upper-triangle Gram of channel-major planes (covariance.ts accumulateOuterProducts):
//   out[i][j] = Σ_k x_ik·conj(x_jk) for j ≥ i, in 2×2 tiles, overwriting out (the caller scales
//   and accumulates). pr, pi: n rows of `count` doubles (real and imaginary planes).
// Requires n and count even: the caller pads with a zero channel or a zero snapshot, which
// adds nothing to any sum. Within a tile row the two lanes sum even and odd snapshots apart and
// meet at the end.

export function gramUpper(pr: usize, pi: usize, out: usize, n: i32, count: i32): void {
  const rowBytes = <usize>count << 3;
  const outRow = <usize>n << 4;
  for (let i = 0; i < n; i += 2) {
    const a = <usize>i * rowBytes;
    const b = a + rowBytes;
    const row0 = out + <usize>i * outRow;
    const row1 = row0 + outRow;
    for (let j = i; j < n; j += 2) {
      const c = <usize>j * rowBytes;
      const d = c + rowBytes;
      let s00r = f64x2.splat(0), s00i = f64x2.splat(0), s01r = f64x2.splat(0), s01i = f64x2.splat(0);
      let s10r = f64x2.splat(0), s10i = f64x2.splat(0), s11r = f64x2.splat(0), s11i = f64x2.splat(0);
      for (let k: usize = 0; k < rowBytes; k += 16) {
        const ar = v128.load(pr + a + k), ai = v128.load(pi + a + k);
        const br = v128.load(pr + b + k), bi = v128.load(pi + b + k);
        const cr = v128.load(pr + c + k), ci = v128.load(pi + c + k);
        const dr = v128.load(pr + d + k), di = v128.load(pi + d + k);
        s00r = f64x2.add(s00r, f64x2.add(f64x2.mul(ar, cr), f64x2.mul(ai, ci)));
        s00i = f64x2.add(s00i, f64x2.sub(f64x2.mul(ai, cr), f64x2.mul(ar, ci)));
        s01r = f64x2.add(s01r, f64x2.add(f64x2.mul(ar, dr), f64x2.mul(ai, di)));
        s01i = f64x2.add(s01i, f64x2.sub(f64x2.mul(ai, dr), f64x2.mul(ar, di)));
        s10r = f64x2.add(s10r, f64x2.add(f64x2.mul(br, cr), f64x2.mul(bi, ci)));
        s10i = f64x2.add(s10i, f64x2.sub(f64x2.mul(bi, cr), f64x2.mul(br, ci)));
        s11r = f64x2.add(s11r, f64x2.add(f64x2.mul(br, dr), f64x2.mul(bi, di)));
        s11i = f64x2.add(s11i, f64x2.sub(f64x2.mul(bi, dr), f64x2.mul(br, di)));
      }
      const o0 = row0 + (<usize>j << 4);
      const o1 = row1 + (<usize>j << 4);
      v128.store(o0, lanesToComplex(s00r, s00i));
      v128.store(o0 + 16, lanesToComplex(s01r, s01i));
      v128.store(o1, lanesToComplex(s10r, s10i));
      v128.store(o1 + 16, lanesToComplex(s11r, s11i));
    }
  }
}

/** (re₀ + re₁, im₀ + im₁) from two lane-split running sums. */
// @ts-ignore: decorator
@inline function lanesToComplex(re: v128, im: v128): v128 {
  return f64x2.add(v128.shuffle<f64>(re, im, 0, 2), v128.shuffle<f64>(re, im, 1, 3));
}
