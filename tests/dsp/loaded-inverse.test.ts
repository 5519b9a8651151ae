import { expect } from 'chai';
import { create, all, type Complex, type Matrix } from 'mathjs';
import { allocateWindowResult, createWindowEngine, type BeamformingEngine } from '../../worker/dsp/window-engine.js';
import { LoadedInverse } from '../../worker/dsp/loaded-inverse.js';
import { blockCovariances } from '../../worker/dsp/covariance.js';
import { choleskyFactor, choleskySolve } from '../../worker/dsp/hermitian-cholesky.js';
import { steeringVector } from '../../worker/dsp/steering.js';
import { lineArray, oneBinSetup } from './support/scenes.js';
import { SeededRandom } from './support/random.js';

const math = create(all);

function toMath(a: Float64Array, n: number): Matrix {
  return math.matrix(Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => math.complex(a[2 * (i * n + j)], a[2 * (i * n + j) + 1]))));
}
function entry(m: Matrix, i: number, j: number): Complex {
  return math.complex((m.toArray() as unknown as Complex[][])[i][j]);
}

/**
 * Snapshot block of one bin: unit white noise plus independent complex Gaussian plane waves
 * (azimuth, power) on a line or 3-D array; K snapshots.
 */
function sceneBlock(pos: Float64Array, k: number, sources: { az: number; power: number }[], rng: SeededRandom): Float64Array {
  const n = pos.length / 3;
  const block = new Float64Array(k * n * 2);
  rng.complexNormal(block);
  for (const s of sources) {
    const v = steeringVector(pos, 1500, s.az, 0, 1500);
    const amp = new Float64Array(2 * k);
    rng.complexNormal(amp, s.power);
    for (let kk = 0; kk < k; kk++) {
      for (let i = 0; i < n; i++) {
        const o = (kk * n + i) * 2;
        block[o] += amp[2 * kk] * v[2 * i] - amp[2 * kk + 1] * v[2 * i + 1];
        block[o + 1] += amp[2 * kk] * v[2 * i + 1] + amp[2 * kk + 1] * v[2 * i];
      }
    }
  }
  return block;
}

/**
 * The grouped MPDR path (Q = R_L⁻¹ from the Cholesky factor, vᴴQv and vᴴQ²v by distinct
 * baselines) must reproduce the substitution path. References: the engine's own substitution
 * kernels (choleskySolve: z = L⁻¹v, R_L⁻¹v = L⁻ᴴz) and mathjs 15 (npm, general-purpose:
 * inv, lusolve), evaluating s = vᴴR_L⁻¹v, w = R_L⁻¹v/s, WNG = 1/‖w‖², P = wᴴR̂w (Capon 1969;
 * definitions as in CONVENTIONS.md).
 *
 * Tolerance 1e-8 relative: the written columns are float32 (relative precision 6e-8, IEEE 754),
 * so anything below that is invisible in the output; the engine's guard (cond(R_L) ≤ 1e6)
 * bounds the worst-case rounding of vᴴQv by eps·cond ≈ 2e-10 and the measured errors of vᴴQ²v
 * stay near 1e-11 at cond ≈ 2e5 (standard scene, bench/dsp-engine.ts).
 */
describe('dsp/loaded inverse: grouped MPDR path against substitution and mathjs', () => {
  it('Q = R_L⁻¹ and Q² match mathjs inv on a random Hermitian positive-definite matrix', () => {
    const n = 9;
    const k = 20;
    const rng = new SeededRandom(31);
    const block = new Float64Array(k * n * 2);
    rng.complexNormal(block);
    const r = new Float64Array(2 * n * n);
    blockCovariances(r, new Float64Array(1), block, 1, k, n);
    const l = new Float64Array(2 * n * n);
    expect(choleskyFactor(l, r, n, 0.05)).to.equal(true);
    const inv = new LoadedInverse(n);
    inv.fromFactor(l);
    const rl = math.add(toMath(r, n), math.multiply(0.05, math.identity(n))) as Matrix;
    const q = math.inv(rl);
    const q2 = math.multiply(q, q) as Matrix;
    const qScale = math.norm(q, 'fro') as number;
    const q2Scale = math.norm(q2, 'fro') as number;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const e = entry(q, i, j);
        expect(inv.q[2 * (i * n + j)]).to.be.closeTo(e.re, 1e-12 * qScale);
        expect(inv.q[2 * (i * n + j) + 1]).to.be.closeTo(e.im, 1e-12 * qScale);
        if (j >= i) {
          const e2 = entry(q2, i, j);
          expect(inv.q2[2 * (i * n + j)]).to.be.closeTo(e2.re, 1e-12 * q2Scale);
          expect(inv.q2[2 * (i * n + j) + 1]).to.be.closeTo(e2.im, 1e-12 * q2Scale);
        }
      }
    }
  });

  const interferer = 21; // degrees; one look direction points straight at it (a deep null)
  const azimuths = [-80, -61, -40, -33, -12, -3, 0, 4, 9, 17, interferer, 26, 38, 55, 71, 90];
  const cases = [
    { name: 'line array, 30 dB interferer, unloaded', geometry: 'line', powerDb: 30, loading: { kind: 'none' as const }, grouped: true },
    { name: 'line array, 30 dB interferer, −10 dB re noise floor', geometry: 'line', powerDb: 30, loading: { kind: 'noise-floor' as const, levelDb: -10 }, grouped: true },
    { name: 'line array, 55 dB interferer, unloaded (cond > 1e6: substitution)', geometry: 'line', powerDb: 55, loading: { kind: 'none' as const }, grouped: false },
    { name: 'random 3-D array, 30 dB interferer, loaded (no repeated baselines: substitution)', geometry: '3-D', powerDb: 30, loading: { kind: 'trace' as const, levelDb: -20 }, grouped: false },
  ];
  for (const c of cases) {
    it(c.name, () => {
      const n = 16;
      const k = 40;
      const rng = new SeededRandom(c.powerDb + (c.geometry === 'line' ? 1 : 2));
      const pos = c.geometry === 'line' ? lineArray(n, 0.5) : Float64Array.from({ length: 3 * n }, () => rng.uniform() * 3);
      // Two saved beams (substitution, weights written); the other 14 take the grouped path when allowed.
      const setup = oneBinSetup(pos, azimuths, { beamformer: 'mpdr', snapshotsPerWindow: k, loading: c.loading, savedBeams: Int32Array.from([2, 9]) });
      const engine = createWindowEngine(setup) as BeamformingEngine;
      engine.setTraining(null, 0, null, 0);
      const out = allocateWindowResult(setup);
      const block = sceneBlock(pos, k, [{ az: interferer, power: 10 ** (c.powerDb / 10) }, { az: -33, power: 10 }], rng);
      engine.processWindow(block, out);
      expect(engine.groupedBins).to.equal(c.grouped ? 1 : 0);

      const r = new Float64Array(2 * n * n);
      blockCovariances(r, new Float64Array(1), block, 1, k, n);
      const delta = out.loading[0];
      const l = new Float64Array(2 * n * n);
      expect(choleskyFactor(l, r, n, delta)).to.equal(true);
      const rl = math.add(toMath(r, n), math.multiply(delta, math.identity(n))) as Matrix;
      const x = new Float64Array(2 * n);
      azimuths.forEach((az, b) => {
        const v = steeringVector(pos, 1500, az, 0, 1500);
        // Substitution reference.
        choleskySolve(x, l, v, n);
        let s = 0;
        let u2 = 0;
        for (let i = 0; i < n; i++) {
          s += v[2 * i] * x[2 * i] + v[2 * i + 1] * x[2 * i + 1];
          u2 += x[2 * i] * x[2 * i] + x[2 * i + 1] * x[2 * i + 1];
        }
        const norm2 = u2 / (s * s);
        const power = 1 / s - delta * norm2;
        expect(out.wng[b], `WNG, beam ${az}°`).to.be.closeTo(1 / norm2, 1e-8 / norm2);
        expect(out.adaptivePower[b], `power, beam ${az}°`).to.be.closeTo(power, 1e-8 * power);
        // mathjs reference: w = R_L⁻¹v/(vᴴR_L⁻¹v), P = wᴴR̂w.
        const vm = math.matrix(Array.from({ length: n }, (_, i) => [math.complex(v[2 * i], v[2 * i + 1])]));
        const xm = math.lusolve(rl, vm) as Matrix;
        const sm = math.complex((math.multiply(math.ctranspose(vm), xm) as Matrix).toArray().flat()[0] as Complex).re;
        const w = math.divide(xm, sm) as Matrix;
        const wng = 1 / (math.norm(w, 'fro') as number) ** 2;
        const pw = math.complex((math.multiply(math.ctranspose(w), math.multiply(toMath(r, n), w)) as Matrix).toArray().flat()[0] as Complex).re;
        expect(out.wng[b], `WNG vs mathjs, beam ${az}°`).to.be.closeTo(wng, 1e-8 * wng);
        expect(out.adaptivePower[b], `power vs mathjs, beam ${az}°`).to.be.closeTo(pw, 1e-8 * pw);
      });
      // The beam on the interferer is a null of the others and its own look is distortionless:
      // its output power is the interferer's (common practice), far above the neighbours' floors.
      expect(out.adaptivePower[azimuths.indexOf(interferer)]).to.be.greaterThan(100 * out.adaptivePower[azimuths.indexOf(0)]);
    });
  }
});
