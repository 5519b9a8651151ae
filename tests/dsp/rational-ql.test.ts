import { expect } from 'chai';
import { HermitianEigenvalues, tqlrat } from '../../worker/dsp/hermitian-eigen.js';

describe('dsp/eigen: square-root-free QL on tridiagonal matrices', () => {
  it('tridiag(−1, 2, −1) has eigenvalues 2 − 2·cos(kπ/(n+1)) (standard closed form of the second-difference matrix, e.g. Golub & Van Loan 2013 §4.8)', () => {
    for (const n of [1, 2, 3, 7, 32, 65]) {
      const d = new Float64Array(n).fill(2);
      const e2 = new Float64Array(n).fill(1); // squared off-diagonals (−1)² = 1
      expect(tqlrat(d, e2, n)).to.equal(true);
      for (let k = 1; k <= n; k++) {
        const expected = 2 - 2 * Math.cos((k * Math.PI) / (n + 1));
        expect(d[k - 1]).to.be.closeTo(expected, 1e-13); // ascending order
      }
    }
  });

  it('Hermitian input with a zero off-diagonal (already split) and a repeated eigenvalue', () => {
    // diag(3, 1, 1) rotated by nothing but with complex phases on a decoupled block: the
    // matrix [[2, j], [−j, 2]] ⊕ [1] has eigenvalues 3, 1, 1 (hand calculation).
    const a = new Float64Array([2, 0, 0, 1, 0, 0, 0, -1, 2, 0, 0, 0, 0, 0, 0, 0, 1, 0]);
    const out = new Float64Array(3);
    expect(new HermitianEigenvalues(3).run(out, 0, a)).to.equal(true);
    expect(out[0]).to.be.closeTo(3, 1e-14);
    expect(out[1]).to.be.closeTo(1, 1e-14);
    expect(out[2]).to.be.closeTo(1, 1e-14);
  });
});
