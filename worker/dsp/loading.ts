/**
 * Diagonal-loading levels δ (CONVENTIONS.md "Windows and estimates", DOMAIN.md §2).
 * The WNG-floor rule needs the solver and lives in the engine; the closed forms are here.
 */

/** 10^(L/10)·tr(R)/N. */
export function traceLoading(levelDb: number, trace: number, n: number): number {
  return Math.pow(10, levelDb / 10) * (trace / n);
}

/** 10^(L/10)·λ_med. */
export function noiseFloorLoading(levelDb: number, medianEigenvalue: number): number {
  return Math.pow(10, levelDb / 10) * medianEigenvalue;
}

/** Median of descending-sorted eigenvalues (mean of the two middle ones for even N). */
export function medianOfSorted(values: Float64Array, off: number, n: number): number {
  const h = n >> 1;
  return n % 2 === 1 ? values[off + h] : 0.5 * (values[off + h - 1] + values[off + h]);
}

/** Sum of the real diagonal of an interleaved N×N matrix. */
export function traceOf(r: Float64Array, off: number, n: number): number {
  let t = 0;
  for (let i = 0; i < n; i++) t += r[off + 2 * (i * n + i)];
  return t;
}

export interface LedoitWolf {
  mu: number;
  d2: number;
  b2: number;
  /** Shrinkage intensity s ∈ [0, 1]. */
  s: number;
  /** Equivalent loading δ = sμ/(1−s) (Infinity when s = 1). */
  delta: number;
}

/**
 * Ledoit & Wolf (2004, J. Multivariate Anal. 88:365–411), complex adaptation with the normalized
 * inner product ⟨A,B⟩ = tr(ABᴴ)/N [our adaptation of the real-valued paper]:
 *   μ = tr R̂/N; d² = ‖R̂ − μI‖²; b̄² = [K⁻¹Σ‖x_k‖⁴ − tr(R̂²)]/(NK); s = min(b̄², d²)/d².
 * `fourthMoment` is K⁻¹Σ‖x_k‖⁴; `k` the number of snapshots behind R̂.
 * Writes into `out` to stay allocation-free.
 */
export function ledoitWolf(out: LedoitWolf, r: Float64Array, off: number, n: number, fourthMoment: number, k: number): LedoitWolf {
  const mu = traceOf(r, off, n) / n;
  let frob2 = 0; // tr(R̂²) = ‖R̂‖_F² for Hermitian R̂
  const m = 2 * n * n;
  for (let i = 0; i < m; i++) frob2 += r[off + i] * r[off + i];
  const d2 = frob2 / n - mu * mu;
  const b2 = (fourthMoment - frob2) / (n * k);
  const s = d2 > 0 ? Math.min(Math.max(b2, 0), d2) / d2 : 0;
  out.mu = mu;
  out.d2 = d2;
  out.b2 = b2;
  out.s = s;
  out.delta = s >= 1 ? Infinity : (s * mu) / (1 - s);
  return out;
}
