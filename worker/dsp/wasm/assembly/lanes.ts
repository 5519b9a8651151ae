// Lane helpers shared by the kernels: a complex value (re, im) lives in one v128 of two f64 lanes.

/** (im, re). */
// @ts-ignore: decorator
@inline export function swap(x: v128): v128 {
  return v128.shuffle<f64>(x, x, 1, 0);
}

/** (re, −im). */
// @ts-ignore: decorator
@inline export function conj(x: v128): v128 {
  return f64x2.mul(x, f64x2(1, -1));
}

// @ts-ignore: decorator
@inline export function lane0(x: v128): f64 {
  return f64x2.extract_lane(x, 0);
}

// @ts-ignore: decorator
@inline export function lane1(x: v128): f64 {
  return f64x2.extract_lane(x, 1);
}

/** lane0 + lane1. */
// @ts-ignore: decorator
@inline export function laneSum(x: v128): f64 {
  return f64x2.extract_lane(x, 0) + f64x2.extract_lane(x, 1);
}
