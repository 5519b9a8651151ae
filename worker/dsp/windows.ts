/**
 * Analysis windows for the STFT (CONVENTIONS.md "Time-frequency": periodic Hann is the
 * default). All windows are *periodic* (DFT-even): w[n] for n = 0…L−1 uses 2πn/L, so that
 * Hann frames at 50 % overlap sum exactly to 1 and the window's DFT has the tabulated
 * spectral figures (Harris 1978, Proc. IEEE 66(1), Table I).
 */

export type WindowKind = 'hann' | 'hamming' | 'blackman';

export const WINDOW_KINDS: readonly WindowKind[] = ['hann', 'hamming', 'blackman'];

/**
 * Cosine-sum coefficients a0, a1, a2 of w[n] = a0 − a1·cos(2πn/L) + a2·cos(4πn/L).
 * Hamming 0.54/0.46 and "exact-free" Blackman 0.42/0.5/0.08 are the classic values (Harris 1978).
 */
const COSINE_SUM: Record<WindowKind, readonly [number, number, number]> = {
  hann: [0.5, 0.5, 0],
  hamming: [0.54, 0.46, 0],
  blackman: [0.42, 0.5, 0.08],
};

/** Builds a periodic window of the given kind and length into a new Float64Array. */
export function makeWindow(kind: WindowKind, length: number): Float64Array {
  if (!Number.isInteger(length) || length < 2) {
    throw new RangeError(`window length must be an integer ≥ 2, got ${length}`);
  }
  const coeffs = COSINE_SUM[kind];
  if (!coeffs) {
    throw new RangeError(`unknown window "${String(kind)}": use one of ${WINDOW_KINDS.join(', ')}`);
  }
  const [a0, a1, a2] = coeffs;
  const w = new Float64Array(length);
  const step = (2 * Math.PI) / length;
  for (let n = 0; n < length; n++) {
    w[n] = a0 - a1 * Math.cos(step * n) + a2 * Math.cos(2 * step * n);
  }
  return w;
}

/** Coherent gain Σw/L: the amplitude a bin-centred tone keeps (0.5 for Hann). */
export function coherentGain(w: Float64Array): number {
  let s = 0;
  for (let n = 0; n < w.length; n++) s += w[n];
  return s / w.length;
}

/**
 * Equivalent noise bandwidth in bins, L·Σw²/(Σw)² (1.5 for Hann): divide a noise power
 * measured in a bin by it to compare with a tone's power.
 */
export function enbwBins(w: Float64Array): number {
  let s = 0;
  let s2 = 0;
  for (let n = 0; n < w.length; n++) {
    s += w[n];
    s2 += w[n] * w[n];
  }
  return (w.length * s2) / (s * s);
}

/** Σw²: the divisor (times fs) that turns |X[k]|² into a one-bin power spectral density (Welch 1967). */
export function windowPowerSum(w: Float64Array): number {
  let s2 = 0;
  for (let n = 0; n < w.length; n++) s2 += w[n] * w[n];
  return s2;
}
