import { expect } from 'chai';
import { blockCovariances, ForgettingCovariance, SlidingCovariance } from '../../worker/dsp/covariance.js';
import { ledoitWolf, traceLoading, noiseFloorLoading } from '../../worker/dsp/loading.js';
import { allocateWindowResult, createWindowEngine } from '../../worker/dsp/window-engine.js';
import { StftKernel, scatterBins, selectBins } from '../../worker/dsp/stft.js';
import { elementLeadsS } from '../../worker/dsp/steering.js';
import { SeededRandom } from './support/random.js';

describe('dsp/loading and covariance estimators', () => {
  // Ledoit & Wolf (2004), J. Multivariate Anal. 88:365–411, complex adaptation (ours, [M]);
  // check values recomputed in DOMAIN.md §2 [C]: μ = 14/9, d² = 529/162, b̄² = 221/324, s = 0.208885.
  it('Ledoit–Wolf check values (N = 3, K = 6)', () => {
    const snaps = [[2, 0, 2, 0, 0, 0], [0, 1, 0, 1, 1, 0], [-1, 0, -1, 0, 0, 1], [1, 1, 1, 0, 0, 0], [0, 0, 1, 0, -1, 0], [0, 2, 0, 2, 1, 0]];
    const block = Float64Array.from(snaps.flat());
    const covs = new Float64Array(18);
    const fourth = new Float64Array(1);
    blockCovariances(covs, fourth, block, 1, 6, 3);
    const lw = ledoitWolf({ mu: 0, d2: 0, b2: 0, s: 0, delta: 0 }, covs, 0, 3, fourth[0], 6);
    expect(lw.mu).to.be.closeTo(14 / 9, 1e-12);
    expect(lw.d2).to.be.closeTo(529 / 162, 1e-12);
    expect(lw.b2).to.be.closeTo(221 / 324, 1e-12);
    expect(lw.s).to.be.closeTo(221 / 1058, 1e-12);
    expect(lw.delta).to.be.closeTo((lw.s * lw.mu) / (1 - lw.s), 1e-12);
  });

  // CONVENTIONS.md formulas: δ = 10^(L/10)·tr(R)/N and δ = 10^(L/10)·λ_med.
  it('trace and noise-floor loading formulas', () => {
    expect(traceLoading(-10, 80, 8)).to.be.closeTo(1, 1e-12);
    expect(noiseFloorLoading(3, 2)).to.be.closeTo(2 * Math.pow(10, 0.3), 1e-12);
  });

  // The sliding partial sums must equal the direct sample covariance of the same K snapshots
  // (the definition R̂ = (1/K)Σxxᴴ, CONVENTIONS.md).
  it('sliding accumulator equals the direct window covariance after several hops', () => {
    const rng = new SeededRandom(5);
    const n = 4;
    const k = 12;
    const hop = 8; // group size gcd(12, 8) = 4
    const all = new Float64Array(40 * n * 2);
    rng.complexNormal(all);
    const slide = new SlidingCovariance(1, n, k, hop);
    slide.push(all.subarray(0, k * n * 2), k);
    for (let start = k; start + hop <= 28; start += hop) slide.push(all.subarray(start * n * 2, (start + hop) * n * 2), hop);
    const got = slide.current();
    const direct = new Float64Array(2 * n * n);
    blockCovariances(direct, new Float64Array(1), all.subarray((28 - k) * n * 2, 28 * n * 2), 1, k, n);
    for (let i = 0; i < direct.length; i++) expect(got[i]).to.be.closeTo(direct[i], 1e-12);
  });

  // DOMAIN.md §2: forgetting R_m = αR_{m−1} + (1−α)xxᴴ, K_eff = (1+α)/(1−α) [C, derived].
  it('exponential forgetting: recursion and K_eff', () => {
    const f = new ForgettingCovariance(1, 1, 0.9);
    expect(f.effectiveSnapshots).to.be.closeTo(19, 1e-12);
    f.update(Float64Array.from([1, 0, 2, 0]), 2);
    expect(f.covariances[0]).to.be.closeTo(0.9 * 0.1 * 1 + 0.1 * 4, 1e-12);
    expect(f.warmedUp).to.equal(false);
  });
});

describe('dsp/engine: scans and gains', () => {
  // DOMAIN.md §1 test [C]: STFT a tone synthesized with the true delays and scan w = v/N (and
  // Capon); the peak must fall at the true azimuth. Reference: the plane-wave model itself.
  it('conventional and Capon scans peak at the true azimuth of a delayed tone run through the STFT', () => {
    const n = 8;
    const fs = 8000;
    const nfft = 256;
    const f0 = 31.25 * 48; // 1500 Hz, on bin 48
    const pos = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) pos[3 * i] = 0.5 * i;
    const trueAz = 23;
    const leads = new Float64Array(n);
    elementLeadsS(leads, pos, trueAz, 0, 1500);
    const frames = 24;
    const hop = nfft / 2;
    const len = (frames - 1) * hop + nfft;
    const rng = new SeededRandom(3);
    const sel = selectBins({ nfft, sampleRateHz: fs, complex: false, band: { loHz: f0, hiHz: f0 } });
    const block = new Float64Array(frames * n * 2);
    const kernel = new StftKernel(nfft);
    const spec = new Float64Array(2 * nfft);
    const x = new Float64Array(len);
    for (let ch = 0; ch < n; ch++) {
      // Element ch hears the wave τ_ch earlier than the origin: x(t) = cos(2πf(t + τ_ch)) + noise.
      for (let t = 0; t < len; t++) x[t] = Math.cos(2 * Math.PI * f0 * (t / fs + leads[ch])) + 0.05 * rng.normal();
      for (let m = 0; m < frames; m++) {
        kernel.real(spec, x, m * hop);
        scatterBins(spec, sel.bins, block, m, ch, n, frames);
      }
    }
    const azimuths = Float64Array.from({ length: 1801 }, (_, i) => -90 + 0.1 * i);
    const engine = createWindowEngine({
      channels: n, positionsM: pos, speedMps: 1500, binFreqsHz: sel.freqsHz, azimuthsDeg: azimuths,
      elevationsDeg: new Float64Array(azimuths.length), savedBeams: new Int32Array(0), beamformer: 'mpdr',
      loading: { kind: 'trace', levelDb: -20 }, snapshotsPerWindow: frames,
    });
    engine.setTraining(null, 0, null, 0);
    const out = allocateWindowResult(engine.setup);
    engine.processWindow(block, out);
    const argmax = (a: Float64Array) => a.reduce((best, v, i) => (v > a[best] ? i : best), 0);
    expect(azimuths[argmax(out.conventionalPower)]).to.be.closeTo(trueAz, 0.15);
    expect(azimuths[argmax(out.adaptivePower)]).to.be.closeTo(trueAz, 0.15);
  });

  // WNG = |wᴴv|²/(wᴴw) = N for w ∝ v (Cauchy–Schwarz equality; DOMAIN.md §2 "Measures").
  it('conventional weights give WNG = N and wᴴv = 1 on a random 3-D geometry', () => {
    const rng = new SeededRandom(9);
    const n = 11;
    const pos = Float64Array.from({ length: 3 * n }, () => rng.uniform() * 2);
    const engine = createWindowEngine({
      channels: n, positionsM: pos, speedMps: 343, binFreqsHz: Float64Array.from([700, 1900]),
      azimuthsDeg: Float64Array.from([-40, 10, 75]), elevationsDeg: Float64Array.from([5, -20, 60]),
      savedBeams: Int32Array.from([1]), beamformer: 'conventional', loading: { kind: 'none' }, snapshotsPerWindow: 16,
    });
    engine.setTraining(null, 0, null, 0);
    const out = allocateWindowResult(engine.setup);
    const block = new Float64Array(2 * 16 * n * 2);
    rng.complexNormal(block);
    engine.processWindow(block, out);
    for (const g of out.wng) expect(g).to.be.closeTo(n, 1e-12);
    for (let i = 0; i < out.adaptivePower.length; i++) expect(out.adaptivePower[i]).to.equal(out.conventionalPower[i]);
  });
});
