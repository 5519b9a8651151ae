/**
 * Micro-benchmark of the numeric core at the standard scenario size: N = 32 elements,
 * K = 64 snapshots, 84 bins, 91 beams, 8 saved, MPDR with trace loading. Reports µs per
 * window-bin for the whole processWindow and the split into covariance, eigenvalues, Cholesky
 * and per-beam solves. Run: node --import tsx bench/dsp-engine.ts
 */
import { allocateWindowResult, createWindowEngine } from '../worker/dsp/window-engine.js';
import { blockCovariances } from '../worker/dsp/covariance.js';
import { HermitianEigenvalues } from '../worker/dsp/hermitian-eigen.js';
import { choleskyFactor, solveLower, solveUpperConjInPlace } from '../worker/dsp/hermitian-cholesky.js';
import type { EngineSetup } from '../worker/dsp/window-engine.types.js';

const N = 32;
const K = 64;
const BINS = 84;
const BEAMS = 91;

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296) - 0.5;
}

const rnd = lcg(7);
const positions = new Float64Array(3 * N);
for (let i = 0; i < N; i++) positions[3 * i] = i * 0.5;
const setup: EngineSetup = {
  channels: N,
  positionsM: positions,
  speedMps: 1500,
  binFreqsHz: Float64Array.from({ length: BINS }, (_, i) => 600 + i * 10),
  azimuthsDeg: Float64Array.from({ length: BEAMS }, (_, i) => -90 + 2 * i),
  elevationsDeg: new Float64Array(BEAMS),
  savedBeams: Int32Array.from([0, 13, 26, 39, 45, 52, 65, 78]),
  beamformer: 'mpdr',
  loading: { kind: 'trace', levelDb: -10 },
  snapshotsPerWindow: K,
};
const block = Float64Array.from({ length: BINS * K * N * 2 }, rnd);

function time(label: string, reps: number, perUnit: number, body: () => void): number {
  body(); // warm-up
  for (let i = 0; i < 3; i++) body();
  const t0 = process.hrtime.bigint();
  for (let r = 0; r < reps; r++) body();
  const us = Number(process.hrtime.bigint() - t0) / 1e3 / reps / perUnit;
  console.log(`${label.padEnd(44)} ${us.toFixed(1).padStart(8)} µs per window-bin`);
  return us;
}

const engine = createWindowEngine(setup);
engine.setTraining(null, 0, null, 0);
const out = allocateWindowResult(setup);
console.log(`N=${N} K=${K} bins=${BINS} beams=${BEAMS} saved=${setup.savedBeams.length} (MPDR, trace loading −10 dB)`);
const total = time('processWindow (all stages)', 20, BINS, () => engine.processWindow(block, out));

const covs = new Float64Array(BINS * 2 * N * N);
const fourth = new Float64Array(BINS);
time('  covariance R̂ (upper triangle + mirror)', 20, BINS, () => blockCovariances(covs, fourth, block, BINS, K, N));
const eig = new HermitianEigenvalues(N);
const ev = new Float64Array(N);
time('  eigenvalues (Householder + QL)', 20, BINS, () => {
  for (let b = 0; b < BINS; b++) eig.run(ev, 0, covs, b * 2 * N * N);
});
const l = new Float64Array(2 * N * N);
time('  Cholesky of R̂ + δI', 50, BINS, () => {
  for (let b = 0; b < BINS; b++) choleskyFactor(l, covs, N, 0.1, b * 2 * N * N);
});
const v = Float64Array.from({ length: BEAMS * 2 * N }, rnd);
const z = new Float64Array(2 * N);
time('  solves, 91 beams (L⁻¹v then L⁻ᴴz)', 20, BINS, () => {
  for (let b = 0; b < BINS; b++) {
    for (let beam = 0; beam < BEAMS; beam++) {
      solveLower(z, 0, l, v, beam * 2 * N, N);
      solveUpperConjInPlace(z, 0, l, N);
    }
  }
});
const windows = 584;
console.log(`whole 10-minute job estimate (${windows} windows × ${BINS} bins): ${((total * windows * BINS) / 1e6).toFixed(1)} s of engine time`);
