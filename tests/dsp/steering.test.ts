import { expect } from 'chai';
import { steeringVector } from '../../worker/dsp/steering.js';

describe('dsp/steering: v_n = exp(+j2πf·p_n·u/c)', () => {
  // DOMAIN.md §1 check [C]: N = 4 along x, d = 0.5 m, c = 1500 m/s, f = 1500 Hz, az = 30°,
  // el = 0 gives v = [1, j, −1, −j] (phase step 2π·1500·0.5·sin30°/1500 = π/2).
  it('line array check value [1, j, −1, −j]', () => {
    const pos = Float64Array.from([0, 0, 0, 0.5, 0, 0, 1, 0, 0, 1.5, 0, 0]);
    const v = steeringVector(pos, 1500, 30, 0, 1500);
    const expected = [1, 0, 0, 1, -1, 0, 0, -1];
    for (let i = 0; i < 8; i++) expect(v[i]).to.be.closeTo(expected[i], 1e-12);
  });

  // CONVENTIONS.md: u = (sin az cos el, cos az cos el, sin el); el = +90° points along +z.
  it('elevation +90° sees only z, azimuth 0 sees only y', () => {
    const pos = Float64Array.from([0, 0, 0, 0, 0, 0.25]);
    const v = steeringVector(pos, 1500, 77, 90, 1500); // phase 2π·1500·0.25/1500 = π/2
    expect(v[2]).to.be.closeTo(0, 1e-12);
    expect(v[3]).to.be.closeTo(1, 1e-12);
    const w = steeringVector(Float64Array.from([0, 0.25, 0]), 1500, 0, 0, 1500);
    expect(w[1]).to.be.closeTo(1, 1e-12);
  });
});
