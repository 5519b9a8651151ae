import { expect } from 'chai';
import { create, all, type Complex, type Matrix } from 'mathjs';
import { allocateWindowResult, createWindowEngine } from '../../worker/dsp/window-engine.js';
import { blockCovariances } from '../../worker/dsp/covariance.js';
import { WindowCovariances } from '../../worker/dsp/window-covariances.js';
import { BaselineGroups } from '../../worker/dsp/baseline-groups.js';
import { steeringVector } from '../../worker/dsp/steering.js';
import { lineArray, oneBinSetup } from './support/scenes.js';
import { SeededRandom } from './support/random.js';

const math = create(all);

/** mathjs complex matrix from a flat interleaved N×N array. */
function toMath(a: Float64Array, n: number, off = 0): Matrix {
  return math.matrix(Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => math.complex(a[off + 2 * (i * n + j)], a[off + 2 * (i * n + j) + 1]))));
}
function col(v: Float64Array, n: number): Matrix {
  return math.matrix(Array.from({ length: n }, (_, i) => [math.complex(v[2 * i], v[2 * i + 1])]));
}
/** Real part of vᴴ·A·v, all in mathjs. */
function quad(a: Matrix, v: Matrix): number {
  const r = math.multiply(math.ctranspose(v), math.multiply(a, v)) as Matrix;
  return math.complex((r.toArray() as unknown as Complex[][])[0][0]).re;
}

/**
 * The engine's speed paths (distinct-baseline conventional power, four-beam MPDR substitution,
 * reuse of overlapping windows' covariance) must give the same numbers as the textbook
 * formulas. Reference: mathjs 15 (npm, general-purpose) evaluating P_B = vᴴR̂v/N²,
 * P_C = 1/(vᴴR_L⁻¹v), w = R_L⁻¹v/(vᴴR_L⁻¹v) with lusolve, and wᴴR̂w, WNG = 1/‖w‖²
 * (Capon 1969; definitions as in CONVENTIONS.md).
 */
describe('dsp/engine speed paths against direct mathjs evaluation', () => {
  for (const geometry of ['line', 'random 3-D'] as const) {
    it(`MPDR, ${geometry} array, 7 beams (remainder of the four-beam passes), trace loading`, () => {
      const n = 8; // a line of 8 has 7 distinct baselines for 28 pairs: the grouped path is used
      const k = 16;
      const rng = new SeededRandom(geometry === 'line' ? 11 : 12);
      const pos = geometry === 'line' ? lineArray(n, 0.5) : Float64Array.from({ length: 3 * n }, () => rng.uniform() * 2);
      const azimuths = [-70, -41, -5, 0, 12, 33, 88];
      const setup = oneBinSetup(pos, azimuths, { beamformer: 'mpdr', snapshotsPerWindow: k, loading: { kind: 'trace', levelDb: -13 } });
      expect(new BaselineGroups(pos, n).worthwhile).to.equal(geometry === 'line');
      const engine = createWindowEngine(setup);
      engine.setTraining(null, 0, null, 0);
      const out = allocateWindowResult(setup);
      const block = new Float64Array(k * n * 2);
      rng.complexNormal(block);
      engine.processWindow(block, out);

      const covs = new Float64Array(2 * n * n);
      blockCovariances(covs, new Float64Array(1), block, 1, k, n);
      const r = toMath(covs, n);
      const delta = out.loading[0];
      const rl = math.add(r, math.multiply(delta, math.identity(n))) as Matrix;
      azimuths.forEach((az, b) => {
        const vArr = steeringVector(pos, 1500, az, 0, 1500);
        const v = col(vArr, n);
        expect(out.conventionalPower[b]).to.be.closeTo(quad(r, v) / (n * n), 1e-12 * quad(r, v));
        const x = math.lusolve(rl, v) as Matrix; // R_L⁻¹v
        const s = math.complex((math.multiply(math.ctranspose(v), x) as Matrix).toArray().flat()[0] as Complex).re;
        const w = math.divide(x, s) as Matrix;
        const wArr = (w.toArray() as unknown as Complex[][]).map((c) => math.complex(c[0]));
        const norm2 = wArr.reduce((acc, c) => acc + c.re * c.re + c.im * c.im, 0);
        expect(out.wng[b]).to.be.closeTo(1 / norm2, 1e-9 / norm2);
        expect(out.adaptivePower[b]).to.be.closeTo(quad(r, w), 1e-9 * quad(r, w));
        for (let i = 0; i < n; i++) {
          expect(out.weights[(b * n + i) * 2]).to.be.closeTo(wArr[i].re, 1e-10);
          expect(out.weights[(b * n + i) * 2 + 1]).to.be.closeTo(wArr[i].im, 1e-10);
        }
      });
    });
  }

  it('overlapping windows: reused covariance groups give bit-identical R̂, close to one pass over K', () => {
    const n = 5;
    const k = 8;
    const hop = 4;
    const nBins = 3;
    const rng = new SeededRandom(5);
    const stream = new Float64Array(nBins * (k + 2 * hop) * n * 2);
    rng.complexNormal(stream);
    const windowBlock = (w: number) => {
      const b = new Float64Array(nBins * k * n * 2);
      for (let f = 0; f < nBins; f++) b.set(stream.subarray((f * (k + 2 * hop) + w * hop) * n * 2, (f * (k + 2 * hop) + w * hop + k) * n * 2), f * k * n * 2);
      return b;
    };
    const fresh = new WindowCovariances(nBins, n, k);
    fresh.update(windowBlock(2));
    const sliding = new WindowCovariances(nBins, n, k);
    sliding.update(windowBlock(0));
    sliding.update(windowBlock(1));
    expect(sliding.reusedGroups).to.equal(1);
    sliding.update(windowBlock(2));
    expect(sliding.reusedGroups).to.equal(1);
    for (let i = 0; i < fresh.covariances.length; i++) expect(Object.is(sliding.covariances[i], fresh.covariances[i])).to.equal(true);
    for (let f = 0; f < nBins; f++) expect(Object.is(sliding.fourthMoments[f], fresh.fourthMoments[f])).to.equal(true);
    // Same estimate as the one-pass sample covariance (DOMAIN.md §2), up to summation order.
    const onePass = new Float64Array(nBins * 2 * n * n);
    blockCovariances(onePass, new Float64Array(nBins), windowBlock(2), nBins, k, n);
    for (let i = 0; i < onePass.length; i++) expect(sliding.covariances[i]).to.be.closeTo(onePass[i], 1e-13);
    // An unrelated block is recomputed in full.
    const other = new Float64Array(nBins * k * n * 2);
    rng.complexNormal(other);
    sliding.update(other);
    expect(sliding.reusedGroups).to.equal(0);
  });
});
