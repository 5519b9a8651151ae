/**
 * STFT of one frame on every channel, scattered into a snapshot block (or the snapshot ring,
 * which uses the same layout): X_m[k] for the selected bins, channel order = element order.
 */
import { StftKernel, scatterBins, splitPairBins } from '../dsp/stft.js';
import type { WindowKind } from '../dsp/windows.js';
import type { SampleCursor } from './sample-cursor.js';

export class FrameTransformer {
  private readonly kernel: StftKernel;
  private readonly spectrum: Float64Array;
  /** Milliseconds spent in the FFT and bin scatter. */
  fftMs = 0;

  constructor(
    readonly nfft: number,
    window: WindowKind,
    private readonly bins: Int32Array,
    private readonly channels: number,
    private readonly complex: boolean,
  ) {
    this.kernel = new StftKernel(nfft, window);
    this.spectrum = new Float64Array(2 * nfft);
  }

  /**
   * Transforms the frame starting at absolute sample `firstSample` (must be in the cursor) into
   * slot `slot` of `target`, a block of `slotsPerBin` snapshots per bin.
   */
  transform(cursor: SampleCursor, firstSample: number, target: Float64Array, slot: number, slotsPerBin: number): void {
    const t0 = performance.now();
    const at = cursor.indexOf(firstSample);
    const nc = this.channels;
    if (this.complex) {
      for (let c = 0; c < nc; c++) {
        this.kernel.complex(this.spectrum, cursor.buffers[c], at);
        scatterBins(this.spectrum, this.bins, target, slot, c, nc, slotsPerBin);
      }
    } else {
      // Real input: two channels per complex transform (stft.ts realPair), odd one out alone.
      let c = 0;
      for (; c + 1 < nc; c += 2) {
        this.kernel.realPair(this.spectrum, cursor.buffers[c], cursor.buffers[c + 1], at);
        splitPairBins(this.spectrum, this.nfft, this.bins, target, slot, c, nc, slotsPerBin);
      }
      if (c < nc) {
        this.kernel.real(this.spectrum, cursor.buffers[c], at);
        scatterBins(this.spectrum, this.bins, target, slot, c, nc, slotsPerBin);
      }
    }
    this.fftMs += performance.now() - t0;
  }
}
