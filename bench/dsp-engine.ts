/**
 * Micro-benchmark of the numeric core at the standard job's size (bench/dsp-bench-support.ts:
 * N = 32, K = 64, 84 bins, 91 beams, 8 saved, MPDR, loading −10 dB re the noise floor).
 * Reports µs per window-bin, CPU time and wall time, for the whole processWindow and for each
 * stage run on its own with the engine's kernels, then the engine's share of a 10-minute job.
 * Target (issue 3): whole job ≥ 20× real time on one core, i.e. the engine ≤ ~400 µs CPU per
 * window-bin. Run: node --import tsx bench/dsp-engine.ts [--reps 20]
 *
 * Figures on the shared 2-core machine (load average 14–20, so wall ≈ 3–7× CPU and even CPU
 * time drifts ±25 % with the load), CPU µs per window-bin, before → after this round of work:
 *   processWindow, window hop 32   1576–1704 → 670–830 (×2.2, same-load A/B: 1704 → 777)
 *   covariance                      251 → 90–120 (tiled dot products; overlap reuse ~−15 %)
 *   eigenvalues                     282 → 120–200 (lower-triangle Householder, no Math.hypot)
 *   Cholesky                         30 → 27–44 (unchanged)
 *   conventional, 91 beams          218 → 13–19 (distinct baselines)
 *   MPDR solves, 91 beams           434 → 360–500 incl. setFactor (four beams per pass; the
 *                                   substitutions themselves stay at N² complex MACs per beam)
 * Second round (load average 14–16; same caveats), CPU µs per window-bin:
 *   processWindow, window hop 32   861 (this round's start) → 511–537
 *   MPDR beams                     400–580 (91 substitutions) → ≈ 110–160: Q = R_L⁻¹ and Q² from
 *                                  the factor (96–124), vᴴQv and vᴴQ²v of 91 beams by distinct
 *                                  baselines (≈ 15–40), the 8 saved beams still by substitution
 *                                  (loaded-inverse.ts; guard in window-engine.ts)
 *   eigenvalues                    same-process A/B 128–176 → 118–126 (two rows per pass)
 * Whole job (node --import tsx bench/run.ts, 10-min file, cached): 12.2× → 15.8× real time per
 * CPU second of the process (wall 229 s → 80 s at load 15 and 14). Target still not met: the
 * engine now splits into eigenvalues ≈ 120–170, covariance ≈ 90–115, MPDR ≈ 110–160,
 * Cholesky ≈ 30, conventional ≈ 15–25; the job adds the FFT stage.
 * Third round (quieter machine at the start, load 3 → 6–10 later; CPU µs per window-bin):
 *   processWindow, window hop 32   462 (load 3) → 408 (load 6)
 *   eigenvalues                    153 → 94: square-root-free rational QL (tqlrat) on the
 *                                  squared off-diagonals instead of QL with Givens rotations;
 *                                  the QL part alone 35–41 → 17–19 µs (32×32). A Householder
 *                                  step fusing the rank-two update with the next step's A·v
 *                                  (single rows) measured 57–69 against 52–65 µs for the
 *                                  two-row unfused form, so it was not kept.
 *   FFT stage (job)                fft.js: one complex 512-point transform ≈ 11–12 µs against
 *                                  ≈ 8–9 µs for one real one, so two real channels per complex
 *                                  transform (stft.ts realPair + splitPairBins) ≈ 30 % less;
 *                                  job FFT share 25.9 % → 18.8 %.
 * Whole job: 17.7× (load 3.0, wall 16.0×) → 19.6× (load 4.4, wall 16.3×) and 20.4× (load 9.4,
 * wall 6.0×) real time per CPU second: at the target, not clearly past it. FFT stage 8.3 → 6.1 s
 * of wall time at similar load; the solve share did not move measurably in the job run despite
 * the eigenvalue gain here (load noise). Left: covariance ≈ 115, Q and Q² ≈ 125, eigenvalues'
 * Householder part ≈ 55–65 µs.
 * Fourth round, 2026-12-03 (quiet machine, load ≈ 1; this host runs the JavaScript engine at
 * 32× real time for the whole job): WebAssembly SIMD kernels (worker/dsp/wasm/assembly/,
 * AssemblyScript, f64x2), the JavaScript kernels kept as reference and fallback
 * (NULLSMITH_KERNELS=js), CPU µs per window-bin:
 *   covariance, window hop 32      57 → 31 (group Gram on f64x2; the kernel alone 31.6 → 10 µs per bin)
 *   Q = R_L⁻¹ and Q² from L        65 → 19
 *   eigenvalues                    72 → 38 (Householder on f64x2; tqlrat stays in JavaScript, ≈ 17)
 *   Cholesky                       21 → 7.5 (including the copy into the kernel's memory)
 *   MPDR solves, 91 beams          253 → 89 (four-beam substitutions; the standard job uses them
 *                                  for its 8 saved beams, jobs with a SINR evaluation block for all)
 *   processWindow, window hop 32   277 → 141–142
 * Whole job (bench/run.ts, 10-min file): see DEVELOPERS.md "Benchmark"; the FFT stage (fft.js) is
 * now the largest single stage.
 */
import { parseArgs } from 'node:util';
import { allocateWindowResult, createWindowEngine } from '../worker/dsp/window-engine.js';
import { blockCovariances } from '../worker/dsp/covariance.js';
import { HermitianEigenvalues } from '../worker/dsp/hermitian-eigen.js';
import { choleskyFactor } from '../worker/dsp/hermitian-cholesky.js';
import { SimdCholesky } from '../worker/dsp/wasm/simd-cholesky.js';
import { FourBeamSolver } from '../worker/dsp/beam-solves.js';
import { LoadedInverse } from '../worker/dsp/loaded-inverse.js';
import { BaselineGroups, groupedQuadraticForm } from '../worker/dsp/baseline-groups.js';
import { WindowCovariances } from '../worker/dsp/window-covariances.js';
import { lookUnitVector, steeringVector } from '../worker/dsp/steering.js';
import { BEAMS, BINS, K, N, sceneBlock, standardSetup, timeIt, WINDOWS_10_MIN } from './dsp-bench-support.js';

const { values } = parseArgs({ options: { reps: { type: 'string', default: '20' } } });
const reps = Math.max(1, Number(values.reps) || 20);

const setup = standardSetup();
const block = sceneBlock(setup, K);
const engine = createWindowEngine(setup);
engine.setTraining(null, 0, null, 0);
const out = allocateWindowResult(setup);
const m = 2 * N * N;
console.log(`N=${N} K=${K} bins=${BINS} beams=${BEAMS} saved=${setup.savedBeams.length} (MPDR, noise-floor loading −10 dB); µs per window-bin`);
// Consecutive windows of the job: hop 32 snapshots, so half of each block repeats the last one.
const HOP = 32;
const long = sceneBlock(setup, K + 7 * HOP, 11);
const windowBlocks = Array.from({ length: 8 }, (_, w) => {
  const b = new Float64Array(BINS * K * N * 2);
  for (let f = 0; f < BINS; f++) b.set(long.subarray((f * (K + 7 * HOP) + w * HOP) * N * 2, (f * (K + 7 * HOP) + w * HOP + K) * N * 2), f * K * N * 2);
  return b;
});
let w = 0;
const total = timeIt('processWindow (all stages, window hop 32)', reps, BINS, () => engine.processWindow(windowBlocks[w++ % 8], out));
timeIt('processWindow (unrelated windows, no overlap)', reps, BINS, () => engine.processWindow(w++ % 2 ? block : windowBlocks[0], out));

const covs = new Float64Array(BINS * m);
const fourth = new Float64Array(BINS);
timeIt('  covariance R̂, every snapshot', reps, BINS, () => blockCovariances(covs, fourth, block, BINS, K, N));
const wc = new WindowCovariances(BINS, N, K);
let cw = 0;
timeIt('  covariance R̂, window hop 32 (overlap reused)', reps, BINS, () => wc.update(windowBlocks[cw++ % 8]));

const eig = new HermitianEigenvalues(N);
const ev = new Float64Array(BINS * N);
timeIt('  eigenvalues (Householder + QL)', reps, BINS, () => {
  for (let b = 0; b < BINS; b++) eig.run(ev, b * N, covs, b * m);
});

const chol = new Float64Array(BINS * m);
timeIt('  Cholesky of R̂ + δI (JavaScript)', reps, BINS, () => {
  for (let b = 0; b < BINS; b++) choleskyFactor(chol.subarray(b * m, (b + 1) * m), covs, N, 0.1 * ev[b * N + N / 2], b * m);
});
const simdChol = SimdCholesky.create(N);
if (simdChol) {
  timeIt('  Cholesky of R̂ + δI (SIMD, incl. copy-in)', reps, BINS, () => {
    for (let b = 0; b < BINS; b++) simdChol.factor(covs, b * m, 0.1 * ev[b * N + N / 2]);
  });
}

const groups = new BaselineGroups(setup.positionsM, N);
const units = new Float64Array(3 * BEAMS);
const u = new Float64Array(3);
for (let b = 0; b < BEAMS; b++) {
  lookUnitVector(u, setup.azimuthsDeg[b], 0);
  units.set(u, 3 * b);
}
const phases = new Float64Array(BINS * BEAMS * groups.count * 2);
groups.fillPhases(phases, setup.binFreqsHz, units, setup.speedMps);
const sums = new Float64Array(2 * groups.count);
let sink = 0;
timeIt(`  conventional power (${groups.count} baselines)`, reps, BINS, () => {
  for (let f = 0; f < BINS; f++) {
    const trace = groups.sumByGroup(sums, covs, f * m);
    for (let b = 0; b < BEAMS; b++) sink += groupedQuadraticForm(trace, sums, phases, (f * BEAMS + b) * groups.count * 2, groups.count);
  }
});

const steer = new Float64Array(BINS * BEAMS * 2 * N);
for (let f = 0; f < BINS; f++) {
  for (let b = 0; b < BEAMS; b++) steer.set(steeringVector(setup.positionsM, setup.binFreqsHz[f], setup.azimuthsDeg[b], 0, setup.speedMps), (f * BEAMS + b) * 2 * N);
}
const solver = new FourBeamSolver(N);
timeIt('  MPDR solves, 91 beams (L⁻¹v, L⁻ᴴz)', reps, BINS, () => {
  for (let f = 0; f < BINS; f++) {
    solver.setFactor(chol.subarray(f * m, (f + 1) * m));
    const base = f * BEAMS * 2 * N;
    for (let b = 0; b < BEAMS; b += 4) {
      const o = (x: number) => base + Math.min(x, BEAMS - 1) * 2 * N;
      solver.solve(steer, o(b), o(b + 1), o(b + 2), o(b + 3));
      sink += solver.uNorm2[0];
    }
  }
});

const inverse = new LoadedInverse(N);
const sumsQ2 = new Float64Array(2 * groups.count);
timeIt('  MPDR grouped: Q = R_L⁻¹, Q² from L', reps, BINS, () => {
  for (let f = 0; f < BINS; f++) inverse.fromFactor(chol.subarray(f * m, (f + 1) * m));
});
timeIt('  MPDR grouped: Q, Q² + vᴴQv, vᴴQ²v, 91 beams', reps, BINS, () => {
  for (let f = 0; f < BINS; f++) {
    inverse.fromFactor(chol.subarray(f * m, (f + 1) * m));
    const trQ = groups.sumByGroup(sums, inverse.q, 0);
    const trQ2 = groups.sumByGroup(sumsQ2, inverse.q2, 0);
    for (let b = 0; b < BEAMS; b++) {
      const pOff = (f * BEAMS + b) * groups.count * 2;
      const s = groupedQuadraticForm(trQ, sums, phases, pOff, groups.count);
      sink += groupedQuadraticForm(trQ2, sumsQ2, phases, pOff, groups.count) / (s * s);
    }
  }
});
console.log(`grouped MPDR bins in the last processWindow: ${engine.groupedBins} of ${BINS}`);

const engineS = (total.cpuUs * WINDOWS_10_MIN * BINS) / 1e6;
console.log(`10-minute job (${WINDOWS_10_MIN} windows × ${BINS} bins): ${engineS.toFixed(1)} s engine CPU time → ${(600 / engineS).toFixed(1)}× real time for the engine alone (wall: ${((total.wallUs * WINDOWS_10_MIN * BINS) / 1e6).toFixed(1)} s)`);
if (!Number.isFinite(sink)) console.log('(non-finite checksum)');
