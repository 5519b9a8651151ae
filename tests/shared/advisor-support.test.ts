import { expect } from 'chai';
import jstat from 'jstat';
import { loadedSmiLoss, marchenkoPasturEdges, mpdrLoss, mpdrSnapshotsFor3Db, smiLoss, snapshotsForLoss } from '../../shared/advisor/snapshot-support.js';
import { checkAliasing } from '../../shared/advisor/aliasing.js';
import { countWindows, estimateOutputBytes, estimateRunSeconds } from '../../shared/advisor/job-estimates.js';

describe('shared/advisor: snapshot support rules', () => {
  // Reed, Mallett & Brennan (1974), IEEE TAES 10(6):853–863, restated in Besson (2021),
  // arXiv:2102.01421 eqs. 19–21; table of DOMAIN.md §3.1.
  it('RMB mean loss table', () => {
    const table: [number, number, number, number][] = [
      [4, 8, 0.6667, -1.76], [16, 16, 0.1176, -9.29], [16, 29, 0.5, -3.01], [16, 32, 0.5455, -2.63],
      [16, 64, 0.7692, -1.14], [16, 160, 0.9068, -0.42], [64, 128, 0.5116, -2.91],
    ];
    for (const [n, k, mean, dB] of table) {
      const r = smiLoss(n, k);
      expect(r.mean).to.be.closeTo(mean, 5e-5);
      expect(r.meanDb).to.be.closeTo(dB, 0.005);
    }
  });

  // The RMB loss is Beta(K−N+2, N−1); its mean and variance checked against jstat (npm).
  it('RMB standard deviation equals that of Beta(K−N+2, N−1) (jstat)', () => {
    const n = 16;
    const k = 32;
    const a = k - n + 2;
    const b = n - 1;
    const betaVar = (a * b) / ((a + b) ** 2 * (a + b + 1));
    expect(smiLoss(n, k).std).to.be.closeTo(Math.sqrt(betaVar), 1e-12);
    // Median from jstat's inverse regularized incomplete beta lies near the mean for this shape.
    expect(jstat.ibetainv(0.5, a, b)).to.be.closeTo(smiLoss(n, k).mean, 0.01);
  });

  // E[ρ] = ½ exactly at K = 2N − 3 (DOMAIN.md §3.1).
  it('snapshots for a 3.0103 dB mean loss is 2N − 3', () => {
    expect(snapshotsForLoss(16, 10 * Math.log10(2))).to.equal(29);
    expect(snapshotsForLoss(16, 1)).to.be.at.least(16);
    expect(smiLoss(16, snapshotsForLoss(16, 1)).meanDb).to.be.at.least(-1);
  });

  // Boroson (1980) approximation, DOMAIN.md §3.2 [C]: N = 16, SINR_o = 11.97 dB:
  // K = 32 → −11.63 dB, K = 64 → −7.74 dB, K = 256 → −3.08 dB.
  it('MPDR loss (Boroson 1980)', () => {
    const s = Math.pow(10, 1.197);
    expect(mpdrLoss(16, 32, s).meanDb).to.be.closeTo(-11.63, 0.01);
    expect(mpdrLoss(16, 64, s).meanDb).to.be.closeTo(-7.74, 0.01);
    expect(mpdrLoss(16, 256, s).meanDb).to.be.closeTo(-3.08, 0.01);
    expect(mpdrSnapshotsFor3Db(16, s)).to.equal(Math.ceil(15 * (1 + s)));
  });

  // Carlson (1988) / Besson (2021) eq. 80: (K−R+1)/(K+1): N = 16, R = 2: K = 4 → 0.600, K = 8 → 0.778.
  it('loaded SMI mean loss', () => {
    expect(loadedSmiLoss(2, 4)).to.be.closeTo(0.6, 1e-12);
    expect(loadedSmiLoss(2, 8)).to.be.closeTo(0.7778, 1e-4);
  });

  // Marchenko & Pastur (1967) [citation from memory]: c = 0.5 → [0.0858, 2.914] (15.3 dB);
  // c = 0.1 → [0.4675, 1.7325] (5.7 dB) (DOMAIN.md §3.5).
  it('Marchenko–Pastur edges', () => {
    const a = marchenkoPasturEdges(50, 100);
    expect(a.lower).to.be.closeTo(0.0858, 1e-4);
    expect(a.upper).to.be.closeTo(2.914, 1e-3);
    expect(a.spreadDb).to.be.closeTo(15.3, 0.05);
    const b = marchenkoPasturEdges(10, 100);
    expect(b.lower).to.be.closeTo(0.4675, 1e-4);
    expect(b.spreadDb).to.be.closeTo(5.7, 0.05);
    expect(() => smiLoss(16, 8)).to.throw(RangeError, /singular/);
  });
});

describe('shared/advisor: aliasing and job estimates', () => {
  // Common practice, DOMAIN.md §5: f ≤ c/(2d): 1000 Hz for 0.75 m in water, 4287.5 Hz for 4 cm in air.
  it('half-wavelength limits', () => {
    const line = (n: number, d: number) => Array.from({ length: 3 * n }, (_, i) => (i % 3 === 0 ? (i / 3) * d : 0));
    expect(checkAliasing(line(8, 0.75), 1500, 900).maxFrequencyHz).to.be.closeTo(1000, 1e-9);
    expect(checkAliasing(line(8, 0.75), 1500, 1100).aliased).to.equal(true);
    expect(checkAliasing(line(4, 0.04), 343, 4000).maxFrequencyHz).to.be.closeTo(4287.5, 1e-9);
    // Limited sector ±30°: d ≤ λ/(1 + ½) → f ≤ c/(1.5·d).
    expect(checkAliasing(line(8, 0.75), 1500, 900, 30).maxFrequencyHz).to.be.closeTo(1500 / 1.125, 1e-9);
    expect(() => checkAliasing([0, 0, 0, 0, 0, 0], 1500, 100)).to.throw(RangeError, /same position|own place/);
  });

  it('window counts follow CONVENTIONS.md frame and window spans', () => {
    const size = { totalFrames: 48000 * 600, channels: 32, nfft: 1024, hop: 512, snapshotsPerWindow: 64, windowHop: 96, bins: 84, beams: 91, savedBeams: 8 };
    const { frames, windows } = countWindows(size);
    expect(frames).to.equal(Math.floor((48000 * 600 - 1024) / 512) + 1);
    expect(windows).to.equal(Math.floor((frames - 64) / 96) + 1);
    expect(estimateRunSeconds(size, 100)).to.be.greaterThan(0);
    expect(estimateOutputBytes(size)).to.be.greaterThan(0);
  });
});
