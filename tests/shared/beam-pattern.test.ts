/** Beam-pattern code the results page draws with, checked against closed forms. */
import { expect } from 'chai';
import { azimuthGrid, beamPattern, conventionalWeights, findNulls } from '../../shared/plots/beam-pattern.js';

const ula = (n: number, d: number) => Array.from({ length: n }, (_, i) => [i * d, 0, 0] as [number, number, number]);

describe('shared/plots beam pattern', () => {
  it('gives the uniform-array pattern and first null of a half-wavelength ULA', () => {
    // N = 16, d = λ/2, broadside: first null at sin θ = λ/(N·d) = 0.125 → 7.18° (DOMAIN.md §3.6, common practice).
    const c = 1500;
    const f = 1500;
    const base = { positionsM: ula(16, 0.5), freqHz: f, speedMps: c };
    const w = conventionalWeights(base, 0);
    const grid = azimuthGrid(-90, 90, 0.01);
    const p = beamPattern({ ...base, weights: w }, grid);
    const at = (deg: number) => p[Math.round((deg + 90) / 0.01)];
    expect(at(0)).to.be.closeTo(1, 1e-12); // distortionless: |wᴴv|² = 1 at the look direction
    const db = Float64Array.from(p, (x) => 10 * Math.log10(x + 1e-300));
    const nulls = findNulls(db, 30).map((i) => grid[i]);
    const first = nulls.filter((a) => a > 0)[0];
    expect(first).to.be.closeTo((Math.asin(0.125) * 180) / Math.PI, 0.02);
    // Dirichlet kernel |sin(Nπu/2)/(N sin(πu/2))|² at u = sin 20° (DOMAIN.md §3.10 β, d = λ/2).
    const u = Math.sin((20 * Math.PI) / 180);
    const beta = Math.sin((16 * Math.PI * u) / 2) / (16 * Math.sin((Math.PI * u) / 2));
    expect(at(20)).to.be.closeTo(beta * beta, 1e-9);
  });

  it('refuses mismatched inputs with a clear message', () => {
    expect(() => beamPattern({ positionsM: ula(4, 0.5), freqHz: 100, speedMps: 1500, weights: [[1, 0]] }, azimuthGrid(0, 1, 1))).to.throw(/1 weights for 4 elements/);
    expect(() => azimuthGrid(5, 1, 1)).to.throw(/from ≤ to/);
  });
});
