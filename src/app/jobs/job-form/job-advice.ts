import { checkAliasing } from '../../../../shared/advisor/aliasing.js';
import { countWindows, estimateOutputBytes, estimateRunSeconds } from '../../../../shared/advisor/job-estimates.js';
import { marchenkoPasturEdges, smiLoss } from '../../../../shared/advisor/snapshot-support.js';
import type { ArrayGeometry } from '../../../../shared/arrays/array-geometry.js';
import type { BeamformParams } from '../../../../shared/params/beamform-params.js';
import { expandBeamFan, selectBins } from '../../../../shared/params/job-layout.js';
import type { RecordingInfo } from '../../../../shared/params/validate-against-recording.js';

export interface Advice {
  n: number;
  k: number;
  kOverN: number;
  /** RMB mean SINR loss and its spread (dB), or null when K < N. */
  loss: { meanDb: number; lowDb: number; highDb: number } | null;
  /** Marchenko–Pastur spread of pure-noise eigenvalues (dB) for N/K ≤ 1. */
  mpSpreadDb: number | null;
  aliasing: { maxFrequencyHz: number; aliased: boolean; spacingM: number } | null;
  bins: number;
  beams: number;
  windows: number;
  runSeconds: number;
  outputBytes: number;
  warnings: string[];
}

/**
 * What the advisor beside the job form says about a parameter set: pure arithmetic from
 * shared/advisor on the chosen recording and array (the server computes the same estimates).
 */
export function adviseJob(params: BeamformParams, rec: RecordingInfo, array: ArrayGeometry, maxOutputBytes: number): Advice {
  const active = array.elements.filter((e) => !e.excluded);
  const n = active.length;
  const k = params.snapshotsPerWindow;
  const warnings: string[] = [];
  let loss: Advice['loss'] = null;
  if (params.beamformer.kind !== 'conventional') {
    if (k >= n) {
      // Reed, Mallett & Brennan (1974): ρ ~ Beta(K−N+2, N−1); mean ± one standard deviation.
      const s = smiLoss(n, k);
      const db = (x: number) => 10 * Math.log10(Math.max(1e-6, x));
      loss = { meanDb: s.meanDb, lowDb: db(s.mean - s.std), highDb: db(Math.min(1, s.mean + s.std)) };
    } else if (params.loading.kind === 'none') {
      warnings.push(`K = ${k} is below N = ${n}: the sample covariance is singular without diagonal loading; choose a loading rule or more snapshots.`);
    }
    if (k < 2 * n) warnings.push(`K = ${k} is below 2N = ${2 * n}: expect more than about 3 dB mean SINR loss from the estimated covariance (Reed, Mallett & Brennan 1974). Loading helps; more snapshots help more.`);
    if (params.beamformer.kind === 'mpdr') warnings.push('MPDR trains on signal-present data: a strong source in the look direction is partly self-nulled unless K is well above (N−1)(1+SINR) (Boroson 1980).');
  }
  const mpSpreadDb = k >= n ? marchenkoPasturEdges(n, k).spreadDb : null;
  const { freqsHz } = selectBins(params, rec);
  const bins = freqsHz.length;
  const topHz = bins ? freqsHz[bins - 1] : 0;
  let aliasing: Advice['aliasing'] = null;
  if (n >= 2 && topHz > 0) {
    const positions = active.flatMap((e) => e.position);
    const a = checkAliasing(positions, params.speedOfSoundMps ?? array.speedOfSoundMps, topHz);
    aliasing = { maxFrequencyHz: a.maxFrequencyHz, aliased: a.aliased, spacingM: a.maxSpacingM };
    if (a.aliased) warnings.push(`Bins above ${a.maxFrequencyHz.toFixed(0)} Hz alias (element spacing ${a.maxSpacingM.toFixed(3)} m > λ/2): grating lobes will show false bearings. Lower the band's top to ${a.maxFrequencyHz.toFixed(0)} Hz.`);
  }
  const beams = expandBeamFan(params.beams).azimuthsDeg.length;
  const size = {
    totalFrames: rec.totalFrames,
    channels: n,
    nfft: params.nfft,
    hop: params.hop,
    snapshotsPerWindow: k,
    windowHop: params.windowHop,
    bins,
    beams,
    savedBeams: params.savedBeams.length,
  };
  const outputBytes = estimateOutputBytes(size);
  if (outputBytes > maxOutputBytes) warnings.push(`The CSV output would be about ${(outputBytes / 2 ** 20).toFixed(0)} MB, above your ${(maxOutputBytes / 2 ** 20).toFixed(0)} MB limit: narrow the band or the fan, or raise the window hop.`);
  return {
    n,
    k,
    kOverN: k / n,
    loss,
    mpSpreadDb,
    aliasing,
    bins,
    beams,
    windows: countWindows(size).windows,
    runSeconds: estimateRunSeconds(size),
    outputBytes,
    warnings,
  };
}
