/**
 * One STFT frame per call (CONVENTIONS.md "Time-frequency"):
 *   X[k] = Σ_{n<nfft} w[n]·x[n]·exp(−j2πkn/nfft),  bin k at k·fs/nfft,
 * for real samples or complex baseband (re, im interleaved). fft.js (indutny) does the
 * transform: its forward kernel uses exp(−j…) twiddles, which tests/dsp/stft.test.ts pins
 * against a direct DFT. Built once per (nfft, window); the per-frame path allocates nothing.
 */
import FFT from 'fft.js';
import { makeWindow, type WindowKind } from './windows.js';
import type { SnapshotBlock } from './window-engine.types.js';

export const MIN_NFFT = 64;
export const MAX_NFFT = 65536;

function checkNfft(nfft: number): void {
  if (!Number.isInteger(nfft) || nfft < MIN_NFFT || nfft > MAX_NFFT || (nfft & (nfft - 1)) !== 0) {
    throw new RangeError(`nfft must be a power of two from ${MIN_NFFT} to ${MAX_NFFT}, got ${nfft}`);
  }
}

export class StftKernel {
  readonly nfft: number;
  /** The analysis window actually applied (length nfft). */
  readonly window: Float64Array;
  private readonly fft: FFT;
  private readonly scratch: Float64Array;

  constructor(nfft: number, window: WindowKind | Float64Array = 'hann') {
    checkNfft(nfft);
    this.nfft = nfft;
    if (typeof window === 'string') {
      this.window = makeWindow(window, nfft);
    } else {
      if (window.length !== nfft) {
        throw new RangeError(`window has ${window.length} samples but nfft is ${nfft}: they must match`);
      }
      this.window = window;
    }
    this.fft = new FFT(nfft);
    // Large enough for the complex path (2·nfft); the real path uses the first nfft.
    this.scratch = new Float64Array(2 * nfft);
  }

  /**
   * Real samples x[offset … offset+nfft) → out (re, im interleaved, length ≥ 2·nfft).
   * Bins 0…nfft/2 are valid afterwards; the mirrored upper half is not filled (real input:
   * only 0 < k < nfft/2 are ever processed).
   */
  real(out: Float64Array, samples: Float64Array, offset = 0): void {
    const n = this.nfft;
    if (offset < 0 || offset + n > samples.length) {
      throw new RangeError(`frame [${offset}, ${offset + n}) runs outside the ${samples.length} samples given`);
    }
    if (out.length < 2 * n) throw new RangeError(`spectrum buffer needs ${2 * n} values, has ${out.length}`);
    const w = this.window;
    const buf = this.scratch;
    for (let i = 0; i < n; i++) buf[i] = w[i] * samples[offset + i];
    // fft.js reads exactly `size` values from the input; a subarray view is not allocated per
    // frame because realTransform only indexes 0…size−1 of what it is given.
    this.fft.realTransform(out, buf);
  }

  /**
   * Two real channels in one complex transform: z[n] = w[n]·(a[n] + j·b[n]) → out (re, im
   * interleaved, all nfft bins of Z). splitPairBins then recovers A[k] and B[k] by conjugate
   * symmetry (A[k] = (Z[k] + Z*[N−k])/2, B[k] = (Z[k] − Z*[N−k])/2j). Why: with fft.js one
   * complex 512-point transform costs ≈ 11.4 µs against ≈ 8.9 µs for one real transform
   * (bench/.p3 micro-benchmark on this machine), so a pair of channels costs ~35 % less.
   */
  realPair(out: Float64Array, a: Float64Array, b: Float64Array, offset = 0): void {
    const n = this.nfft;
    if (offset < 0 || offset + n > a.length || offset + n > b.length) {
      throw new RangeError(`frame [${offset}, ${offset + n}) runs outside the ${Math.min(a.length, b.length)} samples given`);
    }
    if (out.length < 2 * n) throw new RangeError(`spectrum buffer needs ${2 * n} values, has ${out.length}`);
    const w = this.window;
    const buf = this.scratch;
    for (let i = 0; i < n; i++) {
      const wi = w[i];
      buf[2 * i] = wi * a[offset + i];
      buf[2 * i + 1] = wi * b[offset + i];
    }
    this.fft.transform(out, buf);
  }

  /**
   * Complex baseband samples (re, im interleaved) starting at complex sample `offset` →
   * out (re, im interleaved, length ≥ 2·nfft); all nfft bins are valid.
   */
  complex(out: Float64Array, iq: Float64Array, offset = 0): void {
    const n = this.nfft;
    if (offset < 0 || 2 * (offset + n) > iq.length) {
      throw new RangeError(`frame [${offset}, ${offset + n}) runs outside the ${iq.length / 2} complex samples given`);
    }
    if (out.length < 2 * n) throw new RangeError(`spectrum buffer needs ${2 * n} values, has ${out.length}`);
    const w = this.window;
    const buf = this.scratch;
    const base = 2 * offset;
    for (let i = 0; i < n; i++) {
      buf[2 * i] = w[i] * iq[base + 2 * i];
      buf[2 * i + 1] = w[i] * iq[base + 2 * i + 1];
    }
    this.fft.transform(out, buf);
  }
}

/**
 * Copies the selected bins of one channel's spectrum into a snapshot block
 * (layout of window-engine.types.ts: ((bin·K + k)·N + n)·2 + re|im).
 */
export function scatterBins(
  spectrum: Float64Array,
  bins: Int32Array,
  block: SnapshotBlock,
  snapshot: number,
  channel: number,
  channels: number,
  snapshotsPerBlock: number,
): void {
  const nb = bins.length;
  for (let b = 0; b < nb; b++) {
    const src = 2 * bins[b];
    const dst = ((b * snapshotsPerBlock + snapshot) * channels + channel) * 2;
    block[dst] = spectrum[src];
    block[dst + 1] = spectrum[src + 1];
  }
}

/**
 * Splits the selected bins of a two-channel spectrum (StftKernel.realPair) into channels
 * `channel` (real part input) and `channel + 1` (imaginary part input) of a snapshot block.
 * Bins must satisfy 0 < k < nfft/2 (real input), so nfft − k is a valid mirror bin.
 */
export function splitPairBins(
  spectrum: Float64Array,
  nfft: number,
  bins: Int32Array,
  block: SnapshotBlock,
  snapshot: number,
  channel: number,
  channels: number,
  snapshotsPerBlock: number,
): void {
  const nb = bins.length;
  for (let b = 0; b < nb; b++) {
    const k = bins[b];
    const zr = spectrum[2 * k];
    const zi = spectrum[2 * k + 1];
    const wr = spectrum[2 * (nfft - k)];
    const wi = spectrum[2 * (nfft - k) + 1];
    const dst = ((b * snapshotsPerBlock + snapshot) * channels + channel) * 2;
    block[dst] = 0.5 * (zr + wr);
    block[dst + 1] = 0.5 * (zi - wi);
    block[dst + 2] = 0.5 * (zi + wi);
    block[dst + 3] = 0.5 * (wr - zr);
  }
}

/** Physical frequency of bin k (DOMAIN.md §1 "Which f goes into v"). */
export function binFrequencyHz(k: number, nfft: number, sampleRateHz: number, complex: boolean, centerFrequencyHz = 0): number {
  if (!complex) return (k * sampleRateHz) / nfft;
  const signed = k >= nfft / 2 ? k - nfft : k;
  return centerFrequencyHz + (signed * sampleRateHz) / nfft;
}

export interface BinSelectionRequest {
  nfft: number;
  sampleRateHz: number;
  /** Complex baseband input (all nfft bins allowed) or real (0 < k < nfft/2). */
  complex: boolean;
  /** Centre frequency of complex baseband, Hz (ignored for real input). */
  centerFrequencyHz?: number;
  /** Physical band, inclusive; exactly one of band or bins. */
  band?: { loHz: number; hiHz: number };
  /** Explicit FFT bin indices. */
  bins?: ArrayLike<number>;
}

export interface BinSelection {
  /** FFT bin indices, ordered by ascending physical frequency. */
  bins: Int32Array;
  /** Physical frequency of each selected bin, Hz (what goes into the steering vector). */
  freqsHz: Float64Array;
}

/** Turns a band or a list of bins into FFT bin indices and their physical frequencies. */
export function selectBins(req: BinSelectionRequest): BinSelection {
  checkNfft(req.nfft);
  const { nfft, sampleRateHz, complex } = req;
  if (!(sampleRateHz > 0) || !Number.isFinite(sampleRateHz)) {
    throw new RangeError(`sample rate must be a positive number of Hz, got ${sampleRateHz}`);
  }
  const fc = complex ? (req.centerFrequencyHz ?? 0) : 0;
  const allowed = (k: number): boolean => (complex ? k >= 0 && k < nfft : k > 0 && k < nfft / 2);
  const allowedText = complex ? `0…${nfft - 1}` : `1…${nfft / 2 - 1} (DC and Nyquist are excluded for real input)`;
  const picked: number[] = [];
  if ((req.band === undefined) === (req.bins === undefined)) {
    throw new RangeError('give either a frequency band or a list of bins, not both and not neither');
  }
  if (req.bins !== undefined) {
    const seen = new Set<number>();
    for (let i = 0; i < req.bins.length; i++) {
      const k = req.bins[i];
      if (!Number.isInteger(k) || !allowed(k)) throw new RangeError(`bin ${k} is not usable: allowed bins are ${allowedText}`);
      if (seen.has(k)) throw new RangeError(`bin ${k} is listed twice`);
      seen.add(k);
      picked.push(k);
    }
  } else {
    const { loHz, hiHz } = req.band!;
    if (!Number.isFinite(loHz) || !Number.isFinite(hiHz) || loHz > hiHz) {
      throw new RangeError(`band ${loHz}…${hiHz} Hz is not a valid range: the low edge must not exceed the high edge`);
    }
    for (let k = 0; k < nfft; k++) {
      if (!allowed(k)) continue;
      const f = binFrequencyHz(k, nfft, sampleRateHz, complex, fc);
      if (f >= loHz && f <= hiHz) picked.push(k);
    }
  }
  if (picked.length === 0) {
    const res = sampleRateHz / nfft;
    throw new RangeError(`no FFT bin falls in the requested selection (bin spacing ${res} Hz): widen the band or pick bins ${allowedText}`);
  }
  const freqOf = (k: number): number => binFrequencyHz(k, nfft, sampleRateHz, complex, fc);
  picked.sort((a, b) => freqOf(a) - freqOf(b));
  return { bins: Int32Array.from(picked), freqsHz: Float64Array.from(picked, freqOf) };
}
