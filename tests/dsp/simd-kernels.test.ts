import { expect } from 'chai';
import fs from 'node:fs';
import { create, all, type Complex, type Matrix } from 'mathjs';
import { accumulateOuterProducts, accumulateOuterProductsJs, mirrorUpper } from '../../worker/dsp/covariance.js';
import { choleskyFactor } from '../../worker/dsp/hermitian-cholesky.js';
import { HermitianEigenvalues } from '../../worker/dsp/hermitian-eigen.js';
import { SimdCholesky } from '../../worker/dsp/wasm/simd-cholesky.js';
import { FourBeamSolver } from '../../worker/dsp/beam-solves.js';
import { LoadedInverse } from '../../worker/dsp/loaded-inverse.js';
import { kernelKind } from '../../worker/dsp/wasm/simd-kernels.js';
import { KERNELS_SOURCE_DIR, KERNELS_SOURCES_HASH_PATH, KERNELS_WASM_PATH } from '../../scripts/compile-kernels.js';
import { kernelSourcesHash } from '../../scripts/kernel-sources-hash.js';
import { SeededRandom } from './support/random.js';

const math = create(all);

function maxRelativeDifference(a: Float64Array, b: Float64Array, from = 0, to = a.length): number {
  let scale = 0;
  let diff = 0;
  for (let i = from; i < to; i++) {
    scale = Math.max(scale, Math.abs(b[i]));
    diff = Math.max(diff, Math.abs(a[i] - b[i]));
  }
  return diff / scale;
}

/**
 * Full Hermitian sample covariance (1/K)·Σ x·xᴴ of K complex Gaussian snapshots at r[off…]
 * (rank-deficient when K < N), and the generator for further draws.
 */
function sampleCovariance(n: number, k: number, seed: number, off = 0): { r: Float64Array; rng: SeededRandom } {
  const rng = new SeededRandom(seed);
  const block = new Float64Array(k * n * 2);
  rng.complexNormal(block);
  const r = new Float64Array(off + 2 * n * n);
  accumulateOuterProductsJs(r, off, block, 0, k, n, 1 / k);
  mirrorUpper(r, off, n);
  return { r, rng };
}

/**
 * The SIMD kernels (worker/dsp/wasm/assembly/) against the JavaScript kernels they replace, which
 * remain the tested reference (covariance and loaded-inverse suites check those against mathjs
 * and the published closed forms), and against mathjs 15 (npm, general-purpose) directly.
 * They sum the same terms in a different order (two lanes), so agreement is to rounding:
 * 1e-12 relative here, far below the float32 precision (6e-8, IEEE 754) of the written results.
 */
// With NULLSMITH_KERNELS=js (npm test's second pass over the numeric core) there is nothing to compare.
const simdInUse = process.env['NULLSMITH_KERNELS'] !== 'js';

(simdInUse ? describe : describe.skip)('dsp/SIMD kernels: WebAssembly against the JavaScript reference', () => {
  it('the built module is current with its sources and this process uses it', () => {
    expect(fs.existsSync(KERNELS_WASM_PATH), 'worker/dsp/wasm/build/kernels.wasm is missing: run `npm run build:kernels`').to.equal(true);
    const built = fs.readFileSync(KERNELS_SOURCES_HASH_PATH, 'utf8').trim();
    expect(built, 'the kernels were built from other sources: run `npm run build:kernels`').to.equal(kernelSourcesHash(KERNELS_SOURCE_DIR));
    expect(kernelKind()).to.equal('wasm-simd');
  });

  for (const [n, count] of [[32, 32], [32, 64], [7, 5], [2, 1], [16, 33]] as const) {
    it(`group Gram Σ x·xᴴ, N = ${n}, ${count} snapshots, matches the JavaScript kernel`, () => {
      const rng = new SeededRandom(n * 100 + count);
      const block = new Float64Array((count + 3) * n * 2);
      rng.complexNormal(block);
      const viaSimd = new Float64Array(2 * n * n).fill(0.25);
      const viaJs = new Float64Array(2 * n * n).fill(0.25);
      const f4Simd = accumulateOuterProducts(viaSimd, 0, block, 3 * n * 2, count, n, 0.5);
      const f4Js = accumulateOuterProductsJs(viaJs, 0, block, 3 * n * 2, count, n, 0.5);
      expect(maxRelativeDifference(viaSimd, viaJs)).to.be.below(1e-12);
      expect(f4Simd).to.be.closeTo(f4Js, 1e-12 * f4Js);
    });
  }

  it('group Gram matches mathjs X·Xᴴ (N = 6, 10 snapshots)', () => {
    const n = 6;
    const count = 10;
    const rng = new SeededRandom(5);
    const block = new Float64Array(count * n * 2);
    rng.complexNormal(block);
    const r = new Float64Array(2 * n * n);
    accumulateOuterProducts(r, 0, block, 0, count, n, 1);
    const x = math.matrix(Array.from({ length: n }, (_, i) => Array.from({ length: count }, (_, k) => math.complex(block[2 * (k * n + i)], block[2 * (k * n + i) + 1]))));
    const gram = (math.multiply(x, math.ctranspose(x)) as Matrix).toArray() as unknown as Complex[][];
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) {
        expect(r[2 * (i * n + j)]).to.be.closeTo(gram[i][j].re, 1e-12);
        expect(r[2 * (i * n + j) + 1]).to.be.closeTo(gram[i][j].im, 1e-12);
      }
    }
  });

  for (const n of [32, 12, 2]) {
    it(`L⁻¹, Q = R_L⁻¹ and Q² (N = ${n}) match the JavaScript kernels`, () => {
      const { r } = sampleCovariance(n, 2 * n + 5, n);
      for (let i = 0; i < n; i++) r[2 * (i * n + i)] += 0.1;
      const l = new Float64Array(2 * n * n);
      expect(choleskyFactor(l, r, n)).to.equal(true);
      const simd = new LoadedInverse(n);
      const js = new LoadedInverse(n, false);
      simd.fromFactor(l);
      js.fromFactor(l);
      expect(maxRelativeDifference(simd.q, js.q)).to.be.below(1e-12);
      // Q²: only the upper triangle is defined.
      const upper = (m: Float64Array) => m.map((v, idx) => (Math.floor(idx / 2) % n >= Math.floor(idx / 2 / n) ? v : 0));
      expect(maxRelativeDifference(upper(simd.q2), upper(js.q2))).to.be.below(1e-12);
    });
  }

  for (const [n, k] of [[32, 64], [32, 16], [9, 30], [3, 2], [2, 5], [1, 3]] as const) {
    it(`eigenvalues by the SIMD Householder reduction (N = ${n}, K = ${k}) match the JavaScript one`, () => {
      const { r } = sampleCovariance(n, k, 1000 + n * k);
      const viaSimd = new Float64Array(n);
      const viaJs = new Float64Array(n);
      expect(new HermitianEigenvalues(n).run(viaSimd, 0, r)).to.equal(true);
      expect(new HermitianEigenvalues(n, false).run(viaJs, 0, r)).to.equal(true);
      // Rank-deficient cases (K < N) have zero eigenvalues: compare against the largest.
      expect(maxRelativeDifference(viaSimd, viaJs)).to.be.below(1e-12);
    });
  }

  for (const [n, k, delta] of [[32, 64, 0], [9, 30, 0.01], [32, 16, 0], [32, 16, 0.5], [1, 2, 0]] as const) {
    it(`Cholesky of R̂ + δI (N = ${n}, K = ${k}, δ = ${delta}) matches the JavaScript factor, and agrees on "not positive definite"`, () => {
      const { r } = sampleCovariance(n, k, 2000 + n * k, 6);
      const viaJs = new Float64Array(2 * n * n);
      const okJs = choleskyFactor(viaJs, r, n, delta, 6);
      const simd = SimdCholesky.create(n)!;
      expect(simd.factor(r, 6, delta)).to.equal(okJs);
      // K < N without loading is singular: both must refuse it (the engine marks the window).
      if (k < n && delta === 0) expect(okJs).to.equal(false);
      if (okJs) {
        const lower = (m: Float64Array) => m.map((v, idx) => (Math.floor(idx / 2) % n <= Math.floor(idx / 2 / n) ? v : 0));
        expect(maxRelativeDifference(lower(simd.l), lower(viaJs))).to.be.below(1e-12);
      }
    });
  }

  for (const n of [32, 7, 1]) {
    it(`four-beam substitutions z = L⁻¹v, u = L⁻ᴴz (N = ${n}) match the JavaScript solver`, () => {
      const { r, rng } = sampleCovariance(n, 3 * n + 2, 3000 + n);
      const l = new Float64Array(2 * n * n);
      expect(choleskyFactor(l, r, n, 0.05)).to.equal(true);
      l.forEach((_, idx) => {
        if (Math.floor(idx / 2) % n > Math.floor(idx / 2 / n)) l[idx] = 99; // upper triangle must be ignored
      });
      const v = new Float64Array(2 * n * 5);
      rng.complexNormal(v);
      const simd = new FourBeamSolver(n);
      const js = new FourBeamSolver(n, false);
      simd.setFactor(l);
      js.setFactor(l);
      const offsets = [2 * n, 0, 8 * n, 2 * n] as const; // a repeated beam, as the engine passes for a short last group
      simd.solve(v, ...offsets);
      js.solve(v, ...offsets);
      expect(maxRelativeDifference(simd.z, js.z)).to.be.below(1e-12);
      expect(maxRelativeDifference(simd.u, js.u)).to.be.below(1e-12);
      expect(maxRelativeDifference(simd.zNorm2, js.zNorm2)).to.be.below(1e-12);
      expect(maxRelativeDifference(simd.uNorm2, js.uNorm2)).to.be.below(1e-12);
    });
  }
});
