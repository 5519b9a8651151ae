import { expect } from 'chai';
import { create, all, type Complex, type Matrix } from 'mathjs';
import { choleskyFactor, choleskySolve } from '../../worker/dsp/hermitian-cholesky.js';
import { HermitianEigenvalues } from '../../worker/dsp/hermitian-eigen.js';
import { SeededRandom } from './support/random.js';
import { randomHermitianPd } from './support/hermitian.js';

const math = create(all);

describe('dsp/linear algebra: complex Cholesky and Hermitian eigenvalues against mathjs', () => {
  const rng = new SeededRandom(2024);

  // Reference: mathjs 15 (npm) lusolve on the same complex system.
  it('Cholesky solve matches mathjs lusolve on a random Hermitian PD system', () => {
    const n = 7;
    const a = randomHermitianPd(rng, n, 20);
    const b = new Float64Array(2 * n);
    rng.complexNormal(b);
    const l = new Float64Array(2 * n * n);
    expect(choleskyFactor(l, a, n)).to.equal(true);
    const x = new Float64Array(2 * n);
    choleskySolve(x, l, b, n);
    const am = math.matrix(Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => math.complex(a[2 * (i * n + j)], a[2 * (i * n + j) + 1]))));
    const bm = math.matrix(Array.from({ length: n }, (_, i) => [math.complex(b[2 * i], b[2 * i + 1])]));
    const ref = (math.lusolve(am, bm) as Matrix).toArray() as unknown as Complex[][];
    for (let i = 0; i < n; i++) {
      const r = math.complex(ref[i][0]);
      expect(x[2 * i]).to.be.closeTo(r.re, 1e-9);
      expect(x[2 * i + 1]).to.be.closeTo(r.im, 1e-9);
    }
  });

  it('Cholesky refuses a rank-deficient matrix (K < N) and accepts it once loaded', () => {
    const n = 6;
    const a = randomHermitianPd(rng, n, 3);
    const l = new Float64Array(2 * n * n);
    expect(choleskyFactor(l, a, n)).to.equal(false);
    expect(choleskyFactor(l, a, n, 0.1)).to.equal(true);
  });

  // Reference: mathjs eigs on the real 2N×2N embedding [[Re, −Im], [Im, Re]], whose spectrum is
  // each Hermitian eigenvalue twice (a standard identity, common practice).
  it('Hermitian eigenvalues match mathjs eigs of the real embedding', () => {
    for (const n of [1, 2, 3, 9, 16]) {
      const a = randomHermitianPd(rng, n, 2 * n);
      const emb = Array.from({ length: 2 * n }, () => new Array<number>(2 * n).fill(0));
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const re = a[2 * (i * n + j)];
          const im = a[2 * (i * n + j) + 1];
          emb[i][j] = re;
          emb[i + n][j + n] = re;
          emb[i][j + n] = -im;
          emb[i + n][j] = im;
        }
      }
      const ref = (math.eigs(emb).values as unknown as number[]).slice().map(Number).sort((p, q) => q - p);
      const out = new Float64Array(n);
      expect(new HermitianEigenvalues(n).run(out, 0, a)).to.equal(true);
      for (let i = 0; i < n; i++) expect(out[i]).to.be.closeTo(ref[2 * i], 1e-9 * Math.max(1, ref[0]));
    }
  });
});
