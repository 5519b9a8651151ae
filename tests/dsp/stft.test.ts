import { expect } from 'chai';
import { StftKernel, selectBins, binFrequencyHz, scatterBins } from '../../worker/dsp/stft.js';
import { makeWindow } from '../../worker/dsp/windows.js';
import { SeededRandom } from './support/random.js';

/** Direct O(n²) DFT of w·x, the textbook definition X[k] = Σ w[n]x[n]e^{−j2πkn/N}. */
function directDft(x: Float64Array, w: Float64Array, complex: boolean): Float64Array {
  const n = w.length;
  const out = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    let re = 0;
    let im = 0;
    for (let t = 0; t < n; t++) {
      const a = (-2 * Math.PI * ((k * t) % n)) / n;
      const xr = w[t] * (complex ? x[2 * t] : x[t]);
      const xi = complex ? w[t] * x[2 * t + 1] : 0;
      re += xr * Math.cos(a) - xi * Math.sin(a);
      im += xr * Math.sin(a) + xi * Math.cos(a);
    }
    out[2 * k] = re;
    out[2 * k + 1] = im;
  }
  return out;
}

describe('dsp/stft: fft.js frames against a direct DFT', () => {
  // Reference: the DFT definition (CONVENTIONS.md "Time-frequency"), evaluated directly.
  const rng = new SeededRandom(11);

  it('real frames match the direct DFT on bins 0…nfft/2 (with an offset)', () => {
    const nfft = 128;
    const x = new Float64Array(nfft + 37);
    for (let i = 0; i < x.length; i++) x[i] = rng.normal();
    const kernel = new StftKernel(nfft);
    const out = new Float64Array(2 * nfft);
    kernel.real(out, x, 37);
    const ref = directDft(x.subarray(37), makeWindow('hann', nfft), false);
    for (let k = 0; k <= nfft / 2; k++) {
      expect(out[2 * k]).to.be.closeTo(ref[2 * k], 1e-10);
      expect(out[2 * k + 1]).to.be.closeTo(ref[2 * k + 1], 1e-10);
    }
  });

  it('complex baseband frames match the direct DFT on all bins', () => {
    const nfft = 64;
    const x = new Float64Array(2 * (nfft + 5));
    for (let i = 0; i < x.length; i++) x[i] = rng.normal();
    const kernel = new StftKernel(nfft, 'blackman');
    const out = new Float64Array(2 * nfft);
    kernel.complex(out, x, 5);
    const ref = directDft(x.subarray(10), makeWindow('blackman', nfft), true);
    for (let k = 0; k < nfft; k++) {
      expect(out[2 * k]).to.be.closeTo(ref[2 * k], 1e-10);
      expect(out[2 * k + 1]).to.be.closeTo(ref[2 * k + 1], 1e-10);
    }
  });

  // DOMAIN.md §1 [C]: fs = 48 kHz, NFFT = 1024 → 46.875 Hz bins, bin 32 = 1500 Hz.
  it('bin frequencies: real and complex baseband', () => {
    expect(binFrequencyHz(32, 1024, 48000, false)).to.equal(1500);
    // Complex baseband: f_c + (k − nfft·[k ≥ nfft/2])·fs/nfft (DOMAIN.md §1).
    expect(binFrequencyHz(1023, 1024, 48000, true, 1e6)).to.equal(1e6 - 46.875);
    expect(binFrequencyHz(512, 1024, 48000, true, 1e6)).to.equal(1e6 - 24000);
    const sel = selectBins({ nfft: 1024, sampleRateHz: 48000, complex: false, band: { loHz: 1400, hiHz: 1600 } });
    expect(Array.from(sel.bins)).to.deep.equal([30, 31, 32, 33, 34]);
    expect(sel.freqsHz[2]).to.equal(1500);
    const cx = selectBins({ nfft: 64, sampleRateHz: 6400, complex: true, centerFrequencyHz: 1000, band: { loHz: 800, hiHz: 1200 } });
    expect(Array.from(cx.bins)).to.deep.equal([62, 63, 0, 1, 2]);
    expect(Array.from(cx.freqsHz)).to.deep.equal([800, 900, 1000, 1100, 1200]);
  });

  it('bin selection rejects unusable requests with clear messages', () => {
    expect(() => selectBins({ nfft: 1024, sampleRateHz: 48000, complex: false, bins: [0] })).to.throw(RangeError, /DC and Nyquist/);
    expect(() => selectBins({ nfft: 1024, sampleRateHz: 48000, complex: false, band: { loHz: 10, hiHz: 20 } })).to.throw(RangeError, /no FFT bin/);
    expect(() => new StftKernel(100)).to.throw(RangeError, /power of two/);
    expect(() => new StftKernel(32)).to.throw(RangeError, /power of two from 64/);
  });

  it('scatterBins writes the snapshot block layout ((bin·K + k)·N + n)·2', () => {
    const spec = new Float64Array([0, 0, 1, 2, 3, 4, 5, 6]);
    const block = new Float64Array(2 * 3 * 2 * 2); // 2 bins, K = 3, N = 2
    scatterBins(spec, Int32Array.from([1, 3]), block, 2, 1, 2, 3);
    expect(block[((0 * 3 + 2) * 2 + 1) * 2]).to.equal(1);
    expect(block[((1 * 3 + 2) * 2 + 1) * 2 + 1]).to.equal(6);
  });
});
