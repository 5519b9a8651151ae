import { expect } from 'chai';
import { allocateWindowResult, createWindowEngine } from '../../worker/dsp/window-engine.js';
import { addRankOne, azimuthForSine, blockWithCovariance, db, identity, lineArray, oneBinSetup, responsePower, steer } from './support/scenes.js';
import type { LoadingRule } from '../../worker/dsp/window-engine.types.js';

/**
 * One interferer with known covariance, N = 8, d = λ/2, INR 20 dB, broadside look, unit white
 * noise (DOMAIN.md §3.10: closed forms from the matrix inversion lemma, every value checked there
 * by direct matrix computation [C]). SINR_o = 1/(wᴴR_n w) for σ_s² = 1.
 */
describe('dsp/engine: single-interferer MVDR against the closed-form table (DOMAIN.md §3.10)', () => {
  const n = 8;
  const pos = lineArray(n, 0.5);
  const vs = steer(pos, 0);

  function run(uI: number, inrDb: number, loading: LoadingRule) {
    const vi = steer(pos, azimuthForSine(uI));
    const rn = identity(n);
    addRankOne(rn, vi, Math.pow(10, inrDb / 10), n);
    const block = blockWithCovariance(rn, n);
    const engine = createWindowEngine(oneBinSetup(pos, [0], { loading }));
    engine.setTraining(block, n, null, 0);
    const out = allocateWindowResult(engine.setup);
    engine.processWindow(block, out);
    return {
      sinrDb: db(1 / out.adaptivePower[0]),
      wngDb: db(out.wng[0]),
      nullDb: db(responsePower(out.weights, 0, vi, n)),
      gain: responsePower(out.weights, 0, vs, n),
      delta: out.loading[0],
      conventionalNullDb: db(responsePower(Float64Array.from(vs, (x) => x / n), 0, vi, n)),
    };
  }

  it('u_I = 0.3: SINR_o 8.916 dB, null −73.66 dB (conventional −15.82), WNG 8.916 dB, wᴴv = 1', () => {
    const r = run(0.3, 20, { kind: 'none' });
    expect(r.sinrDb).to.be.closeTo(8.916, 0.001);
    expect(r.nullDb).to.be.closeTo(-73.66, 0.01);
    expect(r.conventionalNullDb).to.be.closeTo(-15.82, 0.01);
    expect(r.wngDb).to.be.closeTo(8.916, 0.001);
    expect(r.gain).to.be.closeTo(1, 1e-12);
  });

  it('u_I = 0.1 (main lobe): SINR_o 5.296 dB, null −52.99 dB, WNG 5.304 dB; INR 40 dB nulls −113.65 / −92.96 dB', () => {
    const r = run(0.1, 20, { kind: 'none' });
    expect(r.sinrDb).to.be.closeTo(5.296, 0.001);
    expect(r.nullDb).to.be.closeTo(-52.99, 0.01);
    expect(r.wngDb).to.be.closeTo(5.304, 0.001);
    expect(run(0.3, 40, { kind: 'none' }).nullDb).to.be.closeTo(-113.65, 0.05);
    expect(run(0.1, 40, { kind: 'none' }).nullDb).to.be.closeTo(-92.96, 0.05);
  });

  it('trace loading −10 dB (δ = 10.1): WNG 5.449 dB, SINR 4.640 dB, null −32.34 dB', () => {
    const r = run(0.1, 20, { kind: 'trace', levelDb: -10 });
    expect(r.delta).to.be.closeTo(10.1, 1e-9); // δ = 0.1·tr(R)/N = 0.1·(1 + 100)
    expect(r.wngDb).to.be.closeTo(5.449, 0.001);
    expect(r.sinrDb).to.be.closeTo(4.64, 0.001);
    expect(r.nullDb).to.be.closeTo(-32.34, 0.01);
  });

  it('noise-floor loading: δ = 10^(L/10)·median eigenvalue (CONVENTIONS.md)', () => {
    // R_n = I + INR·v vᴴ has eigenvalues 1 + N·INR and seven ones, so λ_med = 1 and δ = 10^(L/10).
    const r = run(0.1, 20, { kind: 'noise-floor', levelDb: 10.0432137378264 }); // 10·log10(10.1)
    expect(r.delta).to.be.closeTo(10.1, 1e-9);
    expect(r.wngDb).to.be.closeTo(5.449, 0.001);
  });

  it('WNG floor 8.031 dB: smallest δ ≈ 437.6 meets the floor, SINR −12.69 dB, null −7.35 dB', () => {
    const r = run(0.1, 20, { kind: 'wng-floor', minWngDb: 8.031 });
    expect(r.delta).to.be.closeTo(437.6, 0.5);
    expect(r.wngDb).to.be.at.least(8.031 - 1e-9);
    expect(r.sinrDb).to.be.closeTo(-12.69, 0.01);
    expect(r.nullDb).to.be.closeTo(-7.35, 0.01);
    // Smallest: 0.1 % less loading falls below the floor (WNG is monotone in δ, DOMAIN.md §2).
    const below = run(0.1, 20, { kind: 'trace', levelDb: db((r.delta * 0.999) / 101) });
    expect(below.wngDb).to.be.below(8.031);
    // A floor above 10·log10 N is refused with a clear message.
    expect(() => createWindowEngine(oneBinSetup(pos, [0], { loading: { kind: 'wng-floor', minWngDb: 9.1 } }))).to.throw(RangeError, /exceeds the largest possible WNG/);
  });

  it('MPDR identity: 1/(vᴴR_x⁻¹v) = 10.12836 for σ_s² = 10, u_I = 0.3', () => {
    const rx = identity(n);
    addRankOne(rx, steer(pos, azimuthForSine(0.3)), 100, n);
    addRankOne(rx, vs, 10, n);
    const engine = createWindowEngine(oneBinSetup(pos, [0], { beamformer: 'mpdr' }));
    engine.setTraining(null, 0, null, 0);
    const out = allocateWindowResult(engine.setup);
    engine.processWindow(blockWithCovariance(rx, n), out);
    expect(out.adaptivePower[0]).to.be.closeTo(10.12836, 5e-6);
    // Conventional: vᴴR_x v/N² = 10 + (1 + 100·|β|²·N)/N with |β|² = 0.02619 (§3.10 table).
    expect(out.conventionalPower[0]).to.be.closeTo(10 + (1 + 100 * 8 * 0.02619) / 8, 1e-3);
  });

  it('flags a window whose R is not positive definite (K < N, no loading) with NaN outputs', () => {
    const engine = createWindowEngine(oneBinSetup(pos, [0, 20], { beamformer: 'mpdr', snapshotsPerWindow: 4 }));
    engine.setTraining(null, 0, null, 0);
    const out = allocateWindowResult(engine.setup);
    const block = new Float64Array(4 * n * 2).map((_, i) => Math.sin(i * 1.7));
    engine.processWindow(block, out);
    expect(out.notPositiveDefinite[0]).to.equal(1);
    expect(out.adaptivePower[0]).to.be.NaN;
    expect(out.wng[1]).to.be.NaN;
    expect(out.weights[0]).to.be.NaN;
    expect(Number.isFinite(out.conventionalPower[0])).to.equal(true);
  });
});
