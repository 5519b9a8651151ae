import { expect } from 'chai';
import { allocateWindowResult, createWindowEngine, hermitianForm } from '../../worker/dsp/window-engine.js';
import { HermitianEigenvalues } from '../../worker/dsp/hermitian-eigen.js';
import { blockCovariances } from '../../worker/dsp/covariance.js';
import { SeededRandom } from './support/random.js';
import { addRankOne, azimuthForSine, identity, lineArray, oneBinSetup, steer } from './support/scenes.js';

/** Fills one bin's block: K snapshots of unit white noise plus Σ sources (power, steering). */
function sceneBlock(rng: SeededRandom, block: Float64Array, n: number, k: number, sources: [number, Float64Array][]): void {
  rng.complexNormal(block);
  const a = new Float64Array(2);
  for (let s = 0; s < k; s++) {
    for (const [power, v] of sources) {
      rng.complexNormal(a, power);
      for (let i = 0; i < n; i++) {
        block[2 * (s * n + i)] += a[0] * v[2 * i] - a[1] * v[2 * i + 1];
        block[2 * (s * n + i) + 1] += a[0] * v[2 * i + 1] + a[1] * v[2 * i];
      }
    }
  }
}

describe('dsp/engine: Monte Carlo checks (seeded)', () => {
  // Reed, Mallett & Brennan (1974), IEEE TAES 10(6): E[ρ] = (K+2−N)/(K+1) for signal-free
  // training; table DOMAIN.md §3.1 (N = 16, K = 32: 0.5455). With R_n = I, ρ = WNG/N.
  it('SMI loss mean matches RMB (K+2−N)/(K+1)', () => {
    const rng = new SeededRandom(1974);
    const n = 16;
    const k = 32;
    const trials = 1500;
    const engine = createWindowEngine(oneBinSetup(lineArray(n, 0.5), [0], { snapshotsPerWindow: k }));
    const out = allocateWindowResult(engine.setup);
    const train = new Float64Array(k * n * 2);
    let sum = 0;
    for (let t = 0; t < trials; t++) {
      rng.complexNormal(train);
      engine.setTraining(train, k, null, 0);
      engine.processWindow(train, out);
      sum += out.wng[0] / n;
    }
    // Monte Carlo standard error ≈ 0.085/√1500 = 0.0022; tolerance 4 standard errors.
    expect(sum / trials).to.be.closeTo((k + 2 - n) / (k + 1), 0.009);
  });

  // Capon & Goodman (1970) [citation from memory], DOMAIN.md §3.4: E[1/(vᴴR̂⁻¹v)] =
  // ((K−N+1)/K)/(vᴴR⁻¹v); N = 16, K = 32 white noise: 17/32 = 0.531 (Monte Carlo there 0.533).
  it('Capon in-sample power bias (K−N+1)/K', () => {
    const rng = new SeededRandom(1970);
    const n = 16;
    const k = 32;
    const trials = 1500;
    const engine = createWindowEngine(oneBinSetup(lineArray(n, 0.5), [0], { beamformer: 'mpdr', snapshotsPerWindow: k }));
    engine.setTraining(null, 0, null, 0);
    const out = allocateWindowResult(engine.setup);
    const block = new Float64Array(k * n * 2);
    let sum = 0;
    for (let t = 0; t < trials; t++) {
      rng.complexNormal(block);
      engine.processWindow(block, out);
      sum += out.adaptivePower[0];
    }
    // vᴴR⁻¹v = N for R = I, so the expectation is (17/32)/16; standard error ≈ 0.3 % of it.
    expect((sum / trials) * n).to.be.closeTo(17 / 32, 0.012);
  });

  // Bias-corrected SINR estimator, DOMAIN.md §2 [C]: N = 8, K = 32, §3.10 scene (u_I = 0.3,
  // INR 20 dB, SNR 0 dB): true 6.139, corrected 6.122, uncorrected 6.352. Checked here against
  // the true SINR of each trial's weights, 1/(wᴴR_n w) with the known R_n; the F(2Kx, 2Ke)
  // interval (90 %) must cover the true value in about 90 % of trials.
  it('SINR estimate: bias correction and interval coverage', () => {
    const rng = new SeededRandom(1987);
    const n = 8;
    const k = 32;
    const trials = 1500;
    const pos = lineArray(n, 0.5);
    const vs = steer(pos, 0);
    const vi = steer(pos, azimuthForSine(0.3));
    const rn = identity(n);
    addRankOne(rn, vi, 100, n);
    const engine = createWindowEngine(oneBinSetup(pos, [0], { snapshotsPerWindow: k }));
    const out = allocateWindowResult(engine.setup);
    const train = new Float64Array(k * n * 2);
    const evalBlock = new Float64Array(k * n * 2);
    const window = new Float64Array(k * n * 2);
    let sumTrue = 0;
    let sumEst = 0;
    let covered = 0;
    for (let t = 0; t < trials; t++) {
      sceneBlock(rng, train, n, k, [[100, vi]]);
      sceneBlock(rng, evalBlock, n, k, [[100, vi]]);
      sceneBlock(rng, window, n, k, [[100, vi], [1, vs]]);
      engine.setTraining(train, k, evalBlock, k);
      engine.processWindow(window, out);
      const truth = 1 / hermitianForm(rn, 0, out.weights, 0, n);
      sumTrue += truth;
      sumEst += out.sinr[0];
      if (out.sinrLow[0] <= truth && truth <= out.sinrHigh[0]) covered++;
    }
    const meanTrue = sumTrue / trials;
    const meanEst = sumEst / trials;
    expect(meanTrue).to.be.closeTo(6.139, 0.1);
    // Per-trial spread ≈ 1.9, so the standard error of the mean is ≈ 0.05; the uncorrected
    // estimator would sit ≈ 0.21 higher.
    expect(meanEst).to.be.closeTo(meanTrue, 0.15);
    expect(covered / trials).to.be.closeTo(0.9, 0.03);
    expect(engine.sinrMethod).to.equal('evaluation-block');
  });

  // Marchenko & Pastur (1967) [citation from memory; law V], DOMAIN.md §3.5: white noise,
  // N = 100, K = 400 (c = 0.25): eigenvalues within [0.25, 2.25]σ² up to ≈ 0.2σ², and exactly
  // mean eigenvalue = tr(R̂)/N.
  it('white-noise eigenvalues stay within the Marchenko–Pastur edges', () => {
    const rng = new SeededRandom(1967);
    const n = 100;
    const k = 400;
    const block = new Float64Array(k * n * 2);
    rng.complexNormal(block);
    const r = new Float64Array(2 * n * n);
    blockCovariances(r, new Float64Array(1), block, 1, k, n);
    const ev = new Float64Array(n);
    expect(new HermitianEigenvalues(n).run(ev, 0, r)).to.equal(true);
    expect(ev[0]).to.be.at.most(2.25 + 0.2);
    expect(ev[n - 1]).to.be.at.least(0.25 - 0.2);
    let tr = 0;
    for (let i = 0; i < n; i++) tr += r[2 * (i * n + i)];
    expect(ev.reduce((a, b) => a + b, 0) / n).to.be.closeTo(tr / n, 1e-10);
  });
});
