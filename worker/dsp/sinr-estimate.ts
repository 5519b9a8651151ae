/**
 * Bias-corrected SINR estimate from disjoint signal-present and noise-only intervals
 * (DOMAIN.md §2): for fixed weights w and complex Gaussian data,
 *   P̂x/P̂n ~ (Px/Pn)·F(2Kx, 2Ke),  E[F(2Kx, 2Ke)] = Ke/(Ke−1),
 * so SINR̂ = ((Ke−1)/Ke)·P̂x/P̂n − 1 is unbiased, and the interval
 *   [Q/F_{1−a/2} − 1, Q/F_{a/2} − 1]  (Q = P̂x/P̂n)
 * covers the true SINR with probability 1 − a. F quantiles come from jstat (npm), computed
 * once per (Kx, Ke) here, never inside the per-bin loop.
 *
 * For MPDR the weights are built from the same window they are evaluated on, so "fixed w"
 * does not hold for P̂x; the interval is then optimistic (documented in the README).
 */
import jstat from 'jstat';

/** Two-sided confidence level of the reported SINR interval. */
export const SINR_CONFIDENCE = 0.9;

export class SinrEstimator {
  readonly signalSnapshots: number;
  readonly noiseSnapshots: number;
  /** (Ke−1)/Ke. */
  readonly biasFactor: number;
  private readonly fLow: number;
  private readonly fHigh: number;

  constructor(signalSnapshots: number, noiseSnapshots: number, confidence = SINR_CONFIDENCE) {
    if (!(signalSnapshots >= 1) || !(noiseSnapshots >= 2)) {
      throw new RangeError(`SINR estimate needs ≥ 1 signal-present and ≥ 2 noise-only snapshots, got ${signalSnapshots} and ${noiseSnapshots}`);
    }
    if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
    this.signalSnapshots = signalSnapshots;
    this.noiseSnapshots = noiseSnapshots;
    this.biasFactor = (noiseSnapshots - 1) / noiseSnapshots;
    const tail = (1 - confidence) / 2;
    this.fLow = jstat.centralF.inv(tail, 2 * signalSnapshots, 2 * noiseSnapshots);
    this.fHigh = jstat.centralF.inv(1 - tail, 2 * signalSnapshots, 2 * noiseSnapshots);
  }

  /** Point estimate ((Ke−1)/Ke)·P̂x/P̂n − 1 (≤ 0 means "not detected"). */
  estimate(px: number, pn: number): number {
    return (this.biasFactor * px) / pn - 1;
  }

  /** Lower confidence bound Q/F_{1−a/2} − 1. */
  lower(px: number, pn: number): number {
    return px / pn / this.fHigh - 1;
  }

  /** Upper confidence bound Q/F_{a/2} − 1. */
  upper(px: number, pn: number): number {
    return px / pn / this.fLow - 1;
  }
}

/**
 * Signal-present data only: a heuristic UPPER BOUND, not an estimate (DOMAIN.md §2). It takes
 * the white-noise floor σ̂w² (median eigenvalue of R̂) as the only noise at the beam output, so
 * interference leaking through the weights is counted as signal:
 *   (P_out − σ̂w²‖w‖²) / (σ̂w²‖w‖²).
 */
export function sinrUpperBound(outputPower: number, noiseFloor: number, weightNorm2: number): number {
  const noise = noiseFloor * weightNorm2;
  return (outputPower - noise) / noise;
}
