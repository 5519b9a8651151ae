/**
 * How many snapshots an adaptive beamformer needs: closed-form rules for the job form and the
 * server. Pure, browser-safe. Sources per function; all restated in DOMAIN.md §3 and §5.
 */

function checkNK(n: number, k: number): void {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`element count N must be a positive integer, got ${n}`);
  if (!Number.isInteger(k) || k < 1) throw new RangeError(`snapshot count K must be a positive integer, got ${k}`);
}

/**
 * Reed, Mallett & Brennan (1974, IEEE TAES 10(6)): with K ≥ N signal-free training snapshots
 * the SINR loss ρ ~ Beta(K−N+2, N−1): mean (K+2−N)/(K+1), variance (K+2−N)(N−1)/((K+1)²(K+2)).
 */
export function smiLoss(n: number, k: number): { mean: number; std: number; meanDb: number } {
  checkNK(n, k);
  if (k < n) throw new RangeError(`with K = ${k} < N = ${n} the unloaded sample covariance is singular: use at least N snapshots or diagonal loading`);
  const mean = (k + 2 - n) / (k + 1);
  const variance = ((k + 2 - n) * (n - 1)) / ((k + 1) ** 2 * (k + 2));
  return { mean, std: Math.sqrt(variance), meanDb: 10 * Math.log10(mean) };
}

/** Smallest K whose RMB mean loss is within `lossDb` (> 0) of optimum: K ≥ (N−2+ρ)/(1−ρ), ρ = 10^(−loss/10). */
export function snapshotsForLoss(n: number, lossDb: number): number {
  checkNK(n, 1);
  if (!(lossDb > 0)) throw new RangeError(`loss target must be a positive number of dB, got ${lossDb}`);
  const rho = Math.pow(10, -lossDb / 10);
  return Math.max(n, Math.ceil((n - 2 + rho) / (1 - rho) - 1e-9));
}

/**
 * Boroson (1980, IEEE TAES 16(4)) approximation for MPDR (signal present in training):
 * E[η] ≈ [(K−N+2)/(K+1)] / [1 + SINR_o·(N−1)/(K+2)]; SINR_o linear.
 */
export function mpdrLoss(n: number, k: number, sinrOptimum: number): { mean: number; meanDb: number } {
  const { mean: rmb } = smiLoss(n, k);
  const mean = rmb / (1 + (sinrOptimum * (n - 1)) / (k + 2));
  return { mean, meanDb: 10 * Math.log10(mean) };
}

/** Derived from Boroson's form: about 3 dB MPDR loss at K ≈ (N−1)(1+SINR_o). */
export function mpdrSnapshotsFor3Db(n: number, sinrOptimum: number): number {
  return Math.ceil((n - 1) * (1 + sinrOptimum));
}

/**
 * Loaded SMI (Carlson 1988, IEEE TAES 24(4)): for rank-R interference and σ_w² ≪ δ ≪ the
 * interference eigenvalues, mean loss ≈ (K−R+1)/(K+1); K ≈ 2R gives about 3 dB.
 */
export function loadedSmiLoss(interferenceRank: number, k: number): number {
  checkNK(interferenceRank, k);
  return (k - interferenceRank + 1) / (k + 1);
}

export const loadedSmiSnapshots = (interferenceRank: number): number => 2 * interferenceRank;

/**
 * Marchenko–Pastur support for white noise and c = N/K ≤ 1: eigenvalues of R̂ fill
 * [σ²(1−√c)², σ²(1+√c)²]; spread in dB is how far apart pure-noise eigenvalues fall.
 */
export function marchenkoPasturEdges(n: number, k: number): { lower: number; upper: number; spreadDb: number } {
  checkNK(n, k);
  const c = n / k;
  if (c > 1) throw new RangeError(`N/K = ${c.toFixed(3)} > 1: with fewer snapshots than elements, N − K eigenvalues are zero`);
  const lower = (1 - Math.sqrt(c)) ** 2;
  const upper = (1 + Math.sqrt(c)) ** 2;
  return { lower, upper, spreadDb: 10 * Math.log10(upper / lower) };
}
