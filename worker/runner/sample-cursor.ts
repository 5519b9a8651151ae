/**
 * A sliding buffer over a FrameSource: `ensure(lo, hi)` makes samples [lo, hi) available in
 * per-channel planar buffers, reading forward in large blocks and keeping what the next
 * frames still need (overlapping STFT frames are read once). Buffers are allocated once; reads
 * go straight into them.
 */
import type { FrameSource } from '../io/frame-source.js';

export class RecordingEndedError extends Error {
  override readonly name = 'RecordingEndedError';
}

export class SampleCursor {
  /** Planar samples per channel; complex data interleaves (re, im). */
  readonly buffers: Float64Array[];
  /** Absolute sample index of buffers[c][0]. */
  bufferStart = 0;
  private bufferLength = 0;
  private readonly width: number;
  /** Milliseconds spent inside source.read (for the benchmark's time shares). */
  readMs = 0;

  constructor(
    private readonly source: FrameSource,
    /** Capacity in samples: at least the longest span one ensure() asks for, plus read-ahead. */
    readonly capacity: number,
  ) {
    this.width = source.complex ? 2 : 1;
    this.buffers = Array.from({ length: source.channels }, () => new Float64Array(capacity * this.width));
  }

  /** Index of absolute sample `s` inside the buffers (in samples, not doubles). */
  indexOf(s: number): number {
    return s - this.bufferStart;
  }

  async ensure(lo: number, hi: number): Promise<void> {
    if (hi - lo > this.capacity) throw new RangeError(`span of ${hi - lo} samples exceeds the cursor capacity ${this.capacity}`);
    const end = this.bufferStart + this.bufferLength;
    if (lo >= this.bufferStart && hi <= end) return;
    if (lo >= this.bufferStart && lo <= end) {
      // Keep [lo, end) and move it to the front.
      const from = (lo - this.bufferStart) * this.width;
      const to = this.bufferLength * this.width;
      for (const b of this.buffers) b.copyWithin(0, from, to);
      this.bufferLength = end - lo;
    } else {
      this.bufferLength = 0;
    }
    this.bufferStart = lo;
    const readFrom = this.bufferStart + this.bufferLength;
    const want = Math.min(this.capacity - this.bufferLength, this.source.totalFrames - readFrom);
    if (want < hi - readFrom) {
      throw new RecordingEndedError(`samples ${lo}..${hi} were needed, but the recording has only ${this.source.totalFrames} frames`);
    }
    const views = this.buffers.map((b) => b.subarray(this.bufferLength * this.width));
    const t0 = performance.now();
    const got = await this.source.read(readFrom, want, views);
    this.readMs += performance.now() - t0;
    if (got < hi - readFrom) {
      throw new RecordingEndedError(`the recording ended early: asked for frames ${readFrom}..${readFrom + want}, got ${got}; the file may be truncated`);
    }
    this.bufferLength += got;
  }
}
