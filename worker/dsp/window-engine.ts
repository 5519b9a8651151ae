/**
 * The per-window numeric core (contract: window-engine.types.ts). Built once per job: steering
 * vectors, factor and eigen workspaces and the SINR quantiles are prepared in the constructor,
 * so processWindow allocates nothing.
 *
 * Per bin: R̂ (covariance.ts) → eigenvalues (Householder + QL) → δ by the loading rule →
 * one complex Cholesky of R̂ + δI → for every look direction z = L⁻¹v, vᴴR_L⁻¹v = ‖z‖²,
 * w = L⁻ᴴz/‖z‖² (so wᴴv = 1), WNG = 1/‖w‖², output power wᴴR̂w.
 *
 * Broadband values are incoherent sums over the processed bins that were positive definite:
 * powers add; broadband SINR = Σ signal-power estimates / Σ noise-power estimates, where for
 * the evaluation-block estimator signal = ((Ke−1)/Ke)·P̂x − P̂n and noise = P̂n, and for the
 * upper bound signal = P_out − σ̂w²‖w‖² and noise = σ̂w²‖w‖².
 */
import type { EngineSetup, SnapshotBlock, WindowEngine, WindowResult } from './window-engine.types.js';
import { blockCovariances } from './covariance.js';
import { WindowCovariances } from './window-covariances.js';
import { HermitianEigenvalues } from './hermitian-eigen.js';
import { choleskyFactor, solveLower, solveUpperConjInPlace } from './hermitian-cholesky.js';
import { elementLeadsS, lookUnitVector, steeringFromLeads } from './steering.js';
import { BaselineGroups, groupedQuadraticForm } from './baseline-groups.js';
import { FourBeamSolver } from './beam-solves.js';
import { SimdCholesky } from './wasm/simd-cholesky.js';
import { LoadedInverse } from './loaded-inverse.js';
import { ledoitWolf, medianOfSorted, noiseFloorLoading, traceLoading, traceOf, type LedoitWolf } from './loading.js';
import { SinrEstimator, sinrUpperBound } from './sinr-estimate.js';

/** How the SINR columns were produced. */
export type SinrMethod = 'evaluation-block' | 'upper-bound';

/** Steering tables larger than this many doubles are computed per bin instead of stored. */
const STEERING_TABLE_LIMIT = 1 << 22;

/**
 * Largest condition number of R_L = R̂ + δI (from the eigenvalues already computed) at which
 * MPDR beams are evaluated through Q = R_L⁻¹ and the distinct baselines (loaded-inverse.ts).
 * Rounding there costs a relative ≈ eps·cond in vᴴQv and ≈ eps·cond² in vᴴQ²v = ‖R_L⁻¹v‖²
 * at worst (a beam on the strongest source); with eps = 2.2e-16 and cond ≤ 1e6 the first stays
 * ≤ 2e-10 and the second's worst-case bound ≤ 2e-4, but measured errors against substitution on
 * the standard scene (cond ≈ 1–2e5, three sources at 30/20/10 dB, K = 64) are below 1e-8
 * relative, under the float32 precision (6e-8) of the written columns: a finite-K estimate never
 * puts a steering vector exactly into the signal subspace, so vᴴQ²v is never as small as the
 * bound assumes (tests/dsp/loaded-inverse.test.ts pins this). Bins above the limit, arrays
 * without repeated baselines, and jobs with a noise-only evaluation block (which need every
 * beam's weight vector) keep the substitution path; so does any beam failing the sanity check
 * s > 0, ‖w‖² ≥ 1/N (WNG ≤ N), and the saved beams, whose weights are written out.
 */
const GROUPED_INVERSE_COND_LIMIT = 1e6;

/** Relative precision of the WNG-floor bisection on δ. */
const WNG_BISECTION_RATIO = 1 + 1e-6;

export function allocateWindowResult(setup: EngineSetup): WindowResult {
  const nBins = setup.binFreqsHz.length;
  const nBeams = setup.azimuthsDeg.length;
  const n = setup.channels;
  const nb = nBins * nBeams;
  return {
    loading: new Float64Array(nBins),
    notPositiveDefinite: new Uint8Array(nBins),
    adaptivePower: new Float64Array(nb),
    conventionalPower: new Float64Array(nb),
    wng: new Float64Array(nb),
    sinr: new Float64Array(nb),
    sinrLow: new Float64Array(nb),
    sinrHigh: new Float64Array(nb),
    broadbandAdaptivePower: new Float64Array(nBeams),
    broadbandConventionalPower: new Float64Array(nBeams),
    broadbandSinr: new Float64Array(nBeams),
    weights: new Float64Array(nBins * setup.savedBeams.length * n * 2),
    eigenvalues: new Float64Array(nBins * n),
    noiseFloor: new Float64Array(nBins),
    mpUpperEdge: new Float64Array(nBins),
    eigenvaluesAboveEdge: new Int32Array(nBins),
    conditionNumber: new Float64Array(nBins),
  };
}

export function createWindowEngine(setup: EngineSetup): BeamformingEngine {
  return new BeamformingEngine(setup);
}

function validateSetup(s: EngineSetup): void {
  const n = s.channels;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`channels must be a positive integer, got ${n}`);
  if (s.positionsM.length !== 3 * n) throw new RangeError(`positionsM must hold 3·N = ${3 * n} numbers (x, y, z per element), got ${s.positionsM.length}`);
  if (!(s.speedMps > 0) || !Number.isFinite(s.speedMps)) throw new RangeError(`propagation speed must be a positive number of m/s, got ${s.speedMps}`);
  if (s.binFreqsHz.length < 1) throw new RangeError('at least one frequency bin is needed');
  if (s.azimuthsDeg.length < 1 || s.azimuthsDeg.length !== s.elevationsDeg.length) {
    throw new RangeError(`azimuths (${s.azimuthsDeg.length}) and elevations (${s.elevationsDeg.length}) must be non-empty and of equal length`);
  }
  for (let i = 0; i < s.savedBeams.length; i++) {
    const b = s.savedBeams[i];
    if (!(b >= 0 && b < s.azimuthsDeg.length)) throw new RangeError(`saved beam index ${b} is outside the fan of ${s.azimuthsDeg.length} look directions`);
  }
  if (!Number.isInteger(s.snapshotsPerWindow) || s.snapshotsPerWindow < 1) {
    throw new RangeError(`snapshots per window K must be a positive integer, got ${s.snapshotsPerWindow}`);
  }
  if (s.loading.kind === 'wng-floor') {
    const maxDb = 10 * Math.log10(n);
    if (!(s.loading.minWngDb <= maxDb + 1e-12)) {
      throw new RangeError(`white-noise-gain floor ${s.loading.minWngDb} dB exceeds the largest possible WNG 10·log10(N) = ${maxDb.toFixed(2)} dB for N = ${n}: lower the floor`);
    }
  }
}

export class BeamformingEngine implements WindowEngine {
  readonly setup: EngineSetup;
  readonly channels: number;
  readonly nBins: number;
  readonly nBeams: number;
  /** SINR method in force after setTraining (upper bound until an evaluation block is given). */
  sinrMethod: SinrMethod = 'upper-bound';

  /**
   * Wall time spent forming covariances in processWindow (ms, summed over calls); the job
   * runner reads it to split its per-stage shares.
   */
  readonly stageTimes = { covarianceMs: 0 };

  private readonly m2: number; // 2N²
  private readonly windowCovs: WindowCovariances;
  private readonly eig: HermitianEigenvalues;
  private readonly chol: Float64Array;
  /** The SIMD Cholesky whose memory `chol` views (null: JavaScript kernels). */
  private readonly simdChol: SimdCholesky | null;
  private readonly z: Float64Array;
  private readonly leads: Float64Array; // nBeams·N lead times
  private readonly steerTable: Float64Array | null; // nBins·nBeams·2N
  private readonly steerScratch: Float64Array; // nBeams·2N when no table
  private readonly savedSlot: Int32Array;
  private readonly failing: Int32Array;
  private readonly lw: LedoitWolf = { mu: 0, d2: 0, b2: 0, s: 0, delta: 0 };
  private readonly trainEig: Float64Array;
  private readonly bbSignal: Float64Array;
  private readonly bbNoise: Float64Array;
  private vBuf: Float64Array;
  private vBase = 0;
  /** Four-look-direction substitution kernel for the MPDR weights. */
  private readonly solver: FourBeamSolver;
  /** Distinct-baseline form of the conventional power (null: per-beam quadratic forms). */
  private readonly groups: BaselineGroups | null;
  private readonly groupPhases: Float64Array; // nBins·nBeams·G·2
  private readonly groupSums: Float64Array; // 2G
  /** R_L⁻¹ and R_L⁻² of the current bin for the grouped MPDR path (null without groups). */
  private readonly inverse: LoadedInverse | null;
  private readonly groupSumsQ2: Float64Array; // 2G
  /** Beam indices left to the substitution path; allBeams = 0…nBeams−1. */
  private readonly pending: Int32Array;
  private readonly allBeams: Int32Array;
  /** Bins of the last processWindow evaluated through Q = R_L⁻¹ (the rest by substitution). */
  groupedBins = 0;

  // MVDR training state (weights fixed per bin and beam).
  private trained = false;
  private readonly trainWeights: Float64Array | null; // nBins·nBeams·2N
  private readonly trainWeightNorm2: Float64Array; // nBins·nBeams
  private readonly trainLoading: Float64Array; // nBins
  private readonly trainNotPd: Uint8Array; // nBins
  // Noise-only evaluation block.
  private evalCovs: Float64Array | null = null;
  private evalNoisePower: Float64Array | null = null; // nBins·nBeams for fixed weights
  private sinrEst: SinrEstimator | null = null;

  constructor(setup: EngineSetup) {
    validateSetup(setup);
    this.setup = setup;
    const n = (this.channels = setup.channels);
    this.nBins = setup.binFreqsHz.length;
    this.nBeams = setup.azimuthsDeg.length;
    this.m2 = 2 * n * n;
    this.windowCovs = new WindowCovariances(this.nBins, n, setup.snapshotsPerWindow);
    this.eig = new HermitianEigenvalues(n);
    this.simdChol = SimdCholesky.create(n);
    this.chol = this.simdChol ? this.simdChol.l : new Float64Array(this.m2);
    this.z = new Float64Array(2 * n);
    this.leads = new Float64Array(this.nBeams * n);
    const lead = new Float64Array(n);
    for (let b = 0; b < this.nBeams; b++) {
      elementLeadsS(lead, setup.positionsM, setup.azimuthsDeg[b], setup.elevationsDeg[b], setup.speedMps);
      this.leads.set(lead, b * n);
    }
    const tableSize = this.nBins * this.nBeams * 2 * n;
    this.steerScratch = new Float64Array(this.nBeams * 2 * n);
    if (tableSize <= STEERING_TABLE_LIMIT) {
      this.steerTable = new Float64Array(tableSize);
      for (let f = 0; f < this.nBins; f++) this.fillSteering(this.steerTable, f * this.nBeams * 2 * n, f);
    } else {
      this.steerTable = null;
    }
    this.vBuf = this.steerScratch;
    this.solver = new FourBeamSolver(n);
    const groups = new BaselineGroups(setup.positionsM, n);
    const phaseSize = this.nBins * this.nBeams * groups.count * 2;
    if (groups.worthwhile && phaseSize <= STEERING_TABLE_LIMIT) {
      this.groups = groups;
      this.groupPhases = new Float64Array(phaseSize);
      const units = new Float64Array(3 * this.nBeams);
      const u = new Float64Array(3);
      for (let b = 0; b < this.nBeams; b++) {
        lookUnitVector(u, setup.azimuthsDeg[b], setup.elevationsDeg[b]);
        units.set(u, 3 * b);
      }
      groups.fillPhases(this.groupPhases, setup.binFreqsHz, units, setup.speedMps);
      this.groupSums = new Float64Array(2 * groups.count);
      this.groupSumsQ2 = new Float64Array(2 * groups.count);
      this.inverse = new LoadedInverse(n);
    } else {
      this.groups = null;
      this.groupPhases = new Float64Array(0);
      this.groupSums = new Float64Array(0);
      this.groupSumsQ2 = new Float64Array(0);
      this.inverse = null;
    }
    this.pending = new Int32Array(this.nBeams);
    this.allBeams = Int32Array.from({ length: this.nBeams }, (_, b) => b);
    this.savedSlot = new Int32Array(this.nBeams).fill(-1);
    for (let s = 0; s < setup.savedBeams.length; s++) this.savedSlot[setup.savedBeams[s]] = s;
    this.failing = new Int32Array(this.nBeams);
    this.trainEig = new Float64Array(n);
    this.bbSignal = new Float64Array(this.nBeams);
    this.bbNoise = new Float64Array(this.nBeams);
    const mvdr = setup.beamformer === 'mvdr';
    this.trainWeights = mvdr ? new Float64Array(this.nBins * this.nBeams * 2 * n) : null;
    this.trainWeightNorm2 = new Float64Array(mvdr ? this.nBins * this.nBeams : 0);
    this.trainLoading = new Float64Array(this.nBins);
    this.trainNotPd = new Uint8Array(this.nBins);
  }

  setTraining(weightsBlock: SnapshotBlock | null, weightsSnapshots: number, evaluationBlock: SnapshotBlock | null, evaluationSnapshots: number): void {
    const n = this.channels;
    const nBins = this.nBins;
    if (evaluationBlock) {
      if (!(evaluationSnapshots >= 2)) throw new RangeError(`the noise-only evaluation block needs at least 2 snapshots per bin, got ${evaluationSnapshots}`);
      this.evalCovs = new Float64Array(nBins * this.m2);
      blockCovariances(this.evalCovs, new Float64Array(nBins), evaluationBlock, nBins, evaluationSnapshots, n);
      this.sinrEst = new SinrEstimator(this.setup.snapshotsPerWindow, evaluationSnapshots);
      this.sinrMethod = 'evaluation-block';
    } else {
      this.evalCovs = null;
      this.sinrEst = null;
      this.sinrMethod = 'upper-bound';
    }
    if (this.setup.beamformer !== 'mvdr') {
      if (weightsBlock) throw new RangeError(`a training block is only used by MVDR; this job runs ${this.setup.beamformer}: pass null`);
      return;
    }
    if (!weightsBlock) throw new RangeError('MVDR needs a noise-only training block (signal absent) to build its weights: pass one, or choose MPDR');
    if (!(weightsSnapshots >= 1)) throw new RangeError(`training block must hold at least one snapshot per bin, got ${weightsSnapshots}`);
    const covs = new Float64Array(nBins * this.m2);
    const fourth = new Float64Array(nBins);
    blockCovariances(covs, fourth, weightsBlock, nBins, weightsSnapshots, n);
    const w = this.trainWeights!;
    this.evalNoisePower = this.evalCovs ? new Float64Array(nBins * this.nBeams) : null;
    const stride = 2 * n;
    for (let f = 0; f < nBins; f++) {
      const off = f * this.m2;
      this.eig.run(this.trainEig, 0, covs, off);
      const delta = this.chooseLoading(covs, off, fourth[f], weightsSnapshots, this.trainEig, 0, f);
      this.trainLoading[f] = delta;
      this.selectSteering(f);
      this.trainNotPd[f] = 0;
      const pd = Number.isFinite(delta) ? this.factorAt(covs, off, delta) : true;
      if (!pd) {
        this.trainNotPd[f] = 1;
        for (let b = 0; b < this.nBeams; b++) this.trainWeightNorm2[f * this.nBeams + b] = NaN;
        continue;
      }
      for (let b = 0; b < this.nBeams; b++) {
        const wOff = (f * this.nBeams + b) * stride;
        const norm2 = this.weightsInto(w, wOff, b, Number.isFinite(delta));
        this.trainWeightNorm2[f * this.nBeams + b] = norm2;
        if (this.evalNoisePower && this.evalCovs) {
          this.evalNoisePower[f * this.nBeams + b] = hermitianForm(this.evalCovs, off, w, wOff, n);
        }
      }
    }
    this.trained = true;
  }

  processWindow(snapshots: SnapshotBlock, out: WindowResult): void {
    const t0 = performance.now();
    const wc = this.windowCovs;
    wc.update(snapshots);
    this.stageTimes.covarianceMs += performance.now() - t0;
    this.processCovariances(wc.covariances, wc.fourthMoments, this.setup.snapshotsPerWindow, out);
  }

  /**
   * Same as processWindow from covariances already formed (nBins·N²·2, full Hermitian), e.g. by
   * ForgettingCovariance or SlidingCovariance. `fourthMoments` (K⁻¹Σ‖x‖⁴ per bin) is needed only
   * by Ledoit–Wolf loading; `effectiveSnapshots` is K (or K_eff under forgetting).
   */
  processCovariances(covs: Float64Array, fourthMoments: Float64Array | null, effectiveSnapshots: number, out: WindowResult): void {
    const n = this.channels;
    const nBeams = this.nBeams;
    const kind = this.setup.beamformer;
    if (kind === 'mvdr' && !this.trained) {
      throw new Error('MVDR weights are not trained yet: call setTraining with a noise-only block before processing windows');
    }
    if (this.setup.loading.kind === 'ledoit-wolf' && !fourthMoments && kind === 'mpdr') {
      throw new RangeError('Ledoit–Wolf loading needs the per-bin fourth moments of the snapshots: pass fourthMoments');
    }
    if (covs.length < this.nBins * this.m2) throw new RangeError(`covariance buffer holds ${covs.length} values, ${this.nBins * this.m2} needed`);
    this.bbSignal.fill(0);
    this.bbNoise.fill(0);
    out.broadbandAdaptivePower.fill(0);
    out.broadbandConventionalPower.fill(0);
    const mpFactor = (1 + Math.sqrt(n / effectiveSnapshots)) ** 2;
    const stride = 2 * n;
    const sinrEst = this.sinrEst;
    this.groupedBins = 0;
    for (let f = 0; f < this.nBins; f++) {
      const off = f * this.m2;
      const eOff = f * n;
      // Eigen diagnostics of the window's R̂.
      this.eig.run(out.eigenvalues, eOff, covs, off);
      const floor = medianOfSorted(out.eigenvalues, eOff, n);
      out.noiseFloor[f] = floor;
      const edge = floor * mpFactor;
      out.mpUpperEdge[f] = edge;
      let above = 0;
      for (let i = 0; i < n; i++) if (out.eigenvalues[eOff + i] > edge) above++;
      out.eigenvaluesAboveEdge[f] = above;
      const lmin = out.eigenvalues[eOff + n - 1];
      out.conditionNumber[f] = lmin > 0 ? out.eigenvalues[eOff] / lmin : Infinity;
      this.selectSteering(f);
      const v = this.vBuf;
      // Conventional power vᴴR̂v/N² (valid whether or not R̂ is invertible).
      const invN2 = 1 / (n * n);
      const groups = this.groups;
      if (groups) {
        const trace = groups.sumByGroup(this.groupSums, covs, off);
        const g = groups.count;
        for (let b = 0; b < nBeams; b++) {
          const p = groupedQuadraticForm(trace, this.groupSums, this.groupPhases, (f * nBeams + b) * g * 2, g) * invN2;
          out.conventionalPower[f * nBeams + b] = p;
          out.broadbandConventionalPower[b] += p;
        }
      } else {
        for (let b = 0; b < nBeams; b++) {
          const p = hermitianForm(covs, off, v, this.vBase + b * stride, n) * invN2;
          out.conventionalPower[f * nBeams + b] = p;
          out.broadbandConventionalPower[b] += p;
        }
      }
      // Weights: MVDR uses the trained ones; MPDR factors this window; conventional v/N.
      let delta = 0;
      let pd = true;
      if (kind === 'mpdr') {
        delta = this.chooseLoading(covs, off, fourthMoments ? fourthMoments[f] : 0, effectiveSnapshots, out.eigenvalues, eOff, f);
        pd = Number.isFinite(delta) ? this.factorAt(covs, off, delta) : true;
      } else if (kind === 'mvdr') {
        delta = this.trainLoading[f];
        pd = this.trainNotPd[f] === 0;
      }
      out.loading[f] = delta;
      out.notPositiveDefinite[f] = pd ? 0 : 1;
      if (!pd) {
        for (let b = 0; b < nBeams; b++) {
          const i = f * nBeams + b;
          out.adaptivePower[i] = NaN;
          out.wng[i] = NaN;
          out.sinr[i] = NaN;
          out.sinrLow[i] = NaN;
          out.sinrHigh[i] = NaN;
          const s = this.savedSlot[b];
          if (s >= 0) out.weights.fill(NaN, ((f * this.setup.savedBeams.length + s) * n) * 2, ((f * this.setup.savedBeams.length + s + 1) * n) * 2);
        }
        continue;
      }
      const nSaved = this.setup.savedBeams.length;
      if (kind === 'mpdr' && Number.isFinite(delta)) {
        const ev = out.eigenvalues;
        const condL = (ev[eOff] + delta) / (ev[eOff + n - 1] + delta);
        if (this.inverse && !sinrEst && condL > 0 && condL <= GROUPED_INVERSE_COND_LIMIT) {
          this.groupedBins++;
          this.mpdrBeamsGrouped(f, delta, floor, out);
        } else {
          this.mpdrBeams(off, f, delta, floor, out, this.allBeams, nBeams);
        }
        continue;
      }
      for (let b = 0; b < nBeams; b++) {
        const i = f * nBeams + b;
        let power: number;
        let norm2: number;
        let wSrc: Float64Array;
        let wOff: number;
        if (kind !== 'mvdr') {
          // Conventional, or MPDR with infinite loading: w = v/N: ‖w‖² = 1/N, output power = conventional power.
          norm2 = 1 / n;
          power = out.conventionalPower[i];
          wSrc = v;
          wOff = this.vBase + b * stride;
          this.copySaved(out.weights, f, nSaved, b, wSrc, wOff, 1 / n);
        } else {
          // MVDR: weights fixed by the training block.
          wSrc = this.trainWeights!;
          wOff = i * stride;
          norm2 = this.trainWeightNorm2[i];
          power = hermitianForm(covs, off, wSrc, wOff, n);
          this.copySaved(out.weights, f, nSaved, b, wSrc, wOff, 1);
        }
        const pn = sinrEst && this.evalCovs
          ? kind === 'mvdr' ? this.evalNoisePower![i] : hermitianForm(this.evalCovs, off, wSrc, wOff, n) * (wSrc === v ? 1 / (n * n) : 1)
          : NaN;
        this.recordBeam(out, i, b, power, norm2, floor, pn);
      }
    }
    for (let b = 0; b < nBeams; b++) {
      out.broadbandSinr[b] = this.bbNoise[b] > 0 ? this.bbSignal[b] / this.bbNoise[b] : NaN;
    }
  }

  /**
   * MPDR outputs of bin f through Q = R_L⁻¹ (this.chol holds the factor of R̂ + δI): per beam
   * s = vᴴQv and ‖R_L⁻¹v‖² = vᴴQ²v by the distinct baselines, ‖w‖² = vᴴQ²v/s², power
   * 1/s − δ‖w‖² (as in mpdrBeams). Saved beams and beams failing the sanity check go to the
   * substitution path (see GROUPED_INVERSE_COND_LIMIT).
   */
  private mpdrBeamsGrouped(f: number, delta: number, floor: number, out: WindowResult): void {
    const n = this.channels;
    const nBeams = this.nBeams;
    const groups = this.groups!;
    const inverse = this.inverse!;
    const g = groups.count;
    inverse.fromFactor(this.chol);
    const trQ = groups.sumByGroup(this.groupSums, inverse.q, 0);
    const trQ2 = groups.sumByGroup(this.groupSumsQ2, inverse.q2, 0);
    const minNorm2 = (1 - 1e-9) / n;
    const phases = this.groupPhases;
    const sumsQ = this.groupSums;
    const sumsQ2 = this.groupSumsQ2;
    const pending = this.pending;
    let count = 0;
    for (let b = 0; b < nBeams; b++) {
      const pOff = (f * nBeams + b) * g * 2;
      // Both forms in one pass over the beam's phases (the table is megabytes: read it once).
      let accQ = 0;
      let accQ2 = 0;
      for (let k = 0; k < 2 * g; k += 2) {
        const er = phases[pOff + k];
        const ei = phases[pOff + k + 1];
        accQ += sumsQ[k] * er - sumsQ[k + 1] * ei;
        accQ2 += sumsQ2[k] * er - sumsQ2[k + 1] * ei;
      }
      const s = trQ + 2 * accQ;
      const t = trQ2 + 2 * accQ2;
      const inv = 1 / s;
      const norm2 = t * inv * inv;
      if (this.savedSlot[b] >= 0 || !(s > 0) || !(norm2 >= minNorm2) || !Number.isFinite(norm2)) {
        pending[count++] = b;
        continue;
      }
      this.recordBeam(out, f * nBeams + b, b, inv - delta * norm2, norm2, floor, NaN);
    }
    if (count > 0) this.mpdrBeams(f * this.m2, f, delta, floor, out, pending, count);
  }

  /**
   * MPDR outputs of the look directions beams[0…count) of bin f from the factor in this.chol
   * (R̂ + δI), four beams per FourBeamSolver pass: s = vᴴR_L⁻¹v, u = R_L⁻¹v, w = u/s,
   * ‖w‖² = ‖u‖²/s², and wᴴR̂w = wᴴ(R̂+δI)w − δ‖w‖² = 1/s − δ‖w‖² (exact, no extra N² pass).
   * `off` locates bin f in the noise-only evaluation block's covariances, when there is one.
   */
  private mpdrBeams(off: number, f: number, delta: number, floor: number, out: WindowResult, beams: Int32Array, count: number): void {
    const n = this.channels;
    const nBeams = this.nBeams;
    const stride = 2 * n;
    const nSaved = this.setup.savedBeams.length;
    const solver = this.solver;
    const v = this.vBuf;
    const base = this.vBase;
    const last = count - 1;
    const evalCovs = this.sinrEst ? this.evalCovs : null;
    solver.setFactor(this.chol);
    for (let i0 = 0; i0 < count; i0 += 4) {
      solver.solve(
        v,
        base + beams[i0] * stride,
        base + beams[Math.min(i0 + 1, last)] * stride,
        base + beams[Math.min(i0 + 2, last)] * stride,
        base + beams[Math.min(i0 + 3, last)] * stride,
      );
      const inPass = Math.min(4, count - i0);
      for (let t = 0; t < inPass; t++) {
        const b = beams[i0 + t];
        const inv = 1 / solver.zNorm2[t];
        const norm2 = solver.uNorm2[t] * inv * inv;
        const slot = this.savedSlot[b];
        if (slot >= 0) solver.copyU(t, out.weights, (f * nSaved + slot) * stride, inv);
        let pn = NaN;
        if (evalCovs) {
          solver.copyU(t, this.z, 0, inv);
          pn = hermitianForm(evalCovs, off, this.z, 0, n);
        }
        this.recordBeam(out, f * nBeams + b, b, inv - delta * norm2, norm2, floor, pn);
      }
    }
  }

  /**
   * Writes one beam's adaptive power, WNG and SINR columns and adds to the broadband sums.
   * `pn` is the evaluation-block noise power P̂n (NaN without an evaluation block: the upper bound is used).
   */
  private recordBeam(out: WindowResult, i: number, b: number, power: number, norm2: number, floor: number, pn: number): void {
    out.adaptivePower[i] = power;
    out.wng[i] = 1 / norm2;
    out.broadbandAdaptivePower[b] += power;
    const sinrEst = this.sinrEst;
    if (sinrEst && this.evalCovs) {
      out.sinr[i] = sinrEst.estimate(power, pn);
      out.sinrLow[i] = sinrEst.lower(power, pn);
      out.sinrHigh[i] = sinrEst.upper(power, pn);
      this.bbSignal[b] += sinrEst.biasFactor * power - pn;
      this.bbNoise[b] += pn;
    } else {
      out.sinr[i] = sinrUpperBound(power, floor, norm2);
      out.sinrLow[i] = NaN;
      out.sinrHigh[i] = NaN;
      const noise = floor * norm2;
      this.bbSignal[b] += power - noise;
      this.bbNoise[b] += noise;
    }
  }

  /** 1/(vᴴR_L⁻¹v) of the last weightsInto call (Capon power of the loaded matrix). */
  private lastCapon = 0;

  /**
   * With this.chol holding L for the current bin: writes w = L⁻ᴴL⁻¹v/(vᴴR_L⁻¹v) for beam b into
   * dst[dOff…] and returns ‖w‖². `adaptive` false writes w = v/N (infinite loading).
   */
  private weightsInto(dst: Float64Array, dOff: number, beam: number, adaptive: boolean): number {
    const n = this.channels;
    const vOff = this.vBase + beam * 2 * n;
    if (!adaptive) {
      for (let i = 0; i < 2 * n; i++) dst[dOff + i] = this.vBuf[vOff + i] / n;
      this.lastCapon = NaN;
      return 1 / n;
    }
    solveLower(dst, dOff, this.chol, this.vBuf, vOff, n);
    let s = 0;
    for (let i = 0; i < 2 * n; i++) s += dst[dOff + i] * dst[dOff + i];
    solveUpperConjInPlace(dst, dOff, this.chol, n);
    const inv = 1 / s;
    let norm2 = 0;
    for (let i = 0; i < 2 * n; i++) {
      const x = dst[dOff + i] * inv;
      dst[dOff + i] = x;
      norm2 += x * x;
    }
    this.lastCapon = inv;
    return norm2;
  }

  private copySaved(dst: Float64Array, f: number, nSaved: number, beam: number, src: Float64Array, sOff: number, scale: number): void {
    const s = this.savedSlot[beam];
    if (s < 0) return;
    const n2 = 2 * this.channels;
    const d = (f * nSaved + s) * n2;
    for (let i = 0; i < n2; i++) dst[d + i] = src[sOff + i] * scale;
  }

  /** Cholesky of covs[off…] + δI into this.chol (on the SIMD kernel when it is built). */
  private factorAt(covs: Float64Array, off: number, delta: number): boolean {
    const simd = this.simdChol;
    return simd ? simd.factor(covs, off, delta) : choleskyFactor(this.chol, covs, this.channels, delta, off);
  }

  /** Loading δ for one bin by the job's rule (eigenvalues of R̂ at eig[eOff…], descending). */
  private chooseLoading(covs: Float64Array, off: number, fourth: number, k: number, eig: Float64Array, eOff: number, f: number): number {
    const n = this.channels;
    const rule = this.setup.loading;
    switch (rule.kind) {
      case 'none':
        return 0;
      case 'trace':
        return traceLoading(rule.levelDb, traceOf(covs, off, n), n);
      case 'noise-floor':
        return noiseFloorLoading(rule.levelDb, medianOfSorted(eig, eOff, n));
      case 'ledoit-wolf':
        return ledoitWolf(this.lw, covs, off, n, fourth, k).delta;
      case 'wng-floor':
        return this.wngFloorLoading(covs, off, Math.pow(10, rule.minWngDb / 10), f);
    }
  }

  /**
   * Smallest δ (to a relative 1e-6) at which every look direction of this bin keeps
   * WNG ≥ gMin, by bisection on log δ (WNG rises monotonically with δ toward N; Cox, Zeskind &
   * Owen 1987). Only beams still failing at the lower bracket are re-checked. Infinity means
   * only conventional weights meet the floor (gMin = N).
   */
  private wngFloorLoading(covs: Float64Array, off: number, gMin: number, f: number): number {
    const n = this.channels;
    const target = gMin * (1 - 1e-12);
    const failing = this.failing;
    let count = 0;
    const scale = traceOf(covs, off, n) / n;
    if (!(scale > 0)) return Infinity;
    this.selectSteering(f);
    // δ = 0 first (when R̂ is invertible).
    if (this.factorAt(covs, off, 0)) {
      for (let b = 0; b < this.nBeams; b++) if (1 / this.weightsInto(this.z, 0, b, true) < target) failing[count++] = b;
      if (count === 0) return 0;
    } else {
      for (let b = 0; b < this.nBeams; b++) failing[count++] = b;
    }
    const failsAt = (delta: number): number => {
      if (!this.factorAt(covs, off, delta)) return count;
      let still = 0;
      for (let i = 0; i < count; i++) {
        const b = failing[i];
        if (1 / this.weightsInto(this.z, 0, b, true) < target) failing[still++] = b;
      }
      return still;
    };
    let lo = scale * 1e-12;
    let hi = scale;
    for (;;) {
      const c = failsAt(hi);
      if (c === 0) break;
      count = c;
      lo = hi;
      hi *= 10;
      if (hi > scale * 1e15) return Infinity;
    }
    while (hi / lo > WNG_BISECTION_RATIO) {
      const mid = Math.sqrt(lo * hi);
      const c = failsAt(mid);
      if (c === 0) hi = mid;
      else {
        lo = mid;
        count = c;
      }
    }
    return hi;
  }

  private fillSteering(dst: Float64Array, base: number, f: number): void {
    const n = this.channels;
    const freq = this.setup.binFreqsHz[f];
    for (let b = 0; b < this.nBeams; b++) {
      steeringFromLeads(dst, this.leads.subarray(b * n, (b + 1) * n), freq, n, base + b * 2 * n);
    }
  }

  /** Points vBuf/vBase at bin f's steering vectors (table slice or freshly computed scratch). */
  private selectSteering(f: number): void {
    if (this.steerTable) {
      this.vBuf = this.steerTable;
      this.vBase = f * this.nBeams * 2 * this.channels;
    } else {
      this.fillSteering(this.steerScratch, 0, f);
      this.vBuf = this.steerScratch;
      this.vBase = 0;
    }
  }
}

/** wᴴ·R·w for Hermitian R (upper triangle read), real result. */
export function hermitianForm(r: Float64Array, rOff: number, w: Float64Array, wOff: number, n: number): number {
  let diag = 0;
  let cross = 0;
  for (let i = 0; i < n; i++) {
    const row = rOff + 2 * i * n;
    const wr = w[wOff + 2 * i];
    const wi = w[wOff + 2 * i + 1];
    diag += r[row + 2 * i] * (wr * wr + wi * wi);
    // t = Σ_{j>i} R_ij·w_j ; cross += Re(conj(w_i)·t)
    let tr = 0;
    let ti = 0;
    for (let j = i + 1; j < n; j++) {
      const ar = r[row + 2 * j];
      const ai = r[row + 2 * j + 1];
      const xr = w[wOff + 2 * j];
      const xi = w[wOff + 2 * j + 1];
      tr += ar * xr - ai * xi;
      ti += ar * xi + ai * xr;
    }
    cross += wr * tr + wi * ti;
  }
  return diag + 2 * cross;
}
