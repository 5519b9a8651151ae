/**
 * Kaiser-windowed sinc kernels (Kaiser 1974, "Nonrecursive digital filter design using the
 * I0-sinh window function", Proc. IEEE ISCAS; window formula as in Oppenheim & Schafer,
 * Discrete-Time Signal Processing, 3rd ed., §7.6). Used for the band-limited source filters and
 * for the fractional delays that put a broadband plane wave on each element.
 */

/** Modified Bessel function of the first kind, order 0, by its power series. */
export function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  const q = (x * x) / 4;
  for (let k = 1; k < 200; k++) {
    term *= q / (k * k);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return sum;
}

/** Kaiser window value at t ∈ [−half, half] (0 outside). */
export function kaiser(t: number, half: number, beta: number): number {
  const r = t / half;
  if (r <= -1 || r >= 1) return 0;
  return besselI0(beta * Math.sqrt(1 - r * r)) / besselI0(beta);
}

export function sinc(x: number): number {
  if (x === 0) return 1;
  const px = Math.PI * x;
  return Math.sin(px) / px;
}

/**
 * Taps that estimate s(m + mu) from s[m − H + 1 .. m + H] (2H taps, mu ∈ [0, 1)): tap k weights
 * sample m − H + 1 + k. Normalised to unit DC gain.
 */
export function fractionalDelayTaps(mu: number, half: number, beta = 8): Float64Array {
  const taps = new Float64Array(2 * half);
  let sum = 0;
  for (let k = 0; k < 2 * half; k++) {
    const t = k - half + 1 - mu;
    taps[k] = sinc(t) * kaiser(t, half, beta);
    sum += taps[k];
  }
  for (let k = 0; k < taps.length; k++) taps[k] /= sum;
  return taps;
}

/** Linear-phase low-pass with cutoff fc (cycles per sample, 0..0.5), odd length. */
export function lowPassTaps(cutoff: number, length: number, beta = 8): Float64Array {
  const taps = new Float64Array(length);
  const mid = (length - 1) / 2;
  for (let k = 0; k < length; k++) {
    const t = k - mid;
    taps[k] = 2 * cutoff * sinc(2 * cutoff * t) * kaiser(t, mid + 1, beta);
  }
  return taps;
}
