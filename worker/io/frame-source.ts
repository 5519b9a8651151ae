/**
 * The seam between reading recordings and the numeric core. A FrameSource hands out
 * float64 samples per CONVENTIONS.md (integer PCM divided by full scale), already in array
 * element order (channel map applied, excluded elements dropped, gain calibration applied).
 *
 * Random access (start frame) lets the job runner resume from a checkpoint and train MVDR on
 * a separate time range without reading the whole file.
 */
export interface FrameSource {
  readonly sampleRate: number;
  /** Channels delivered, i.e. active array elements, in element order. */
  readonly channels: number;
  /** True for complex baseband (SigMF c* types): each sample is (re, im). */
  readonly complex: boolean;
  /** Centre frequency in Hz for complex baseband; 0 for real recordings. */
  readonly centerFrequencyHz: number;
  /** Sample frames (one sample per channel) in the recording. */
  readonly totalFrames: number;
  /**
   * Reads frames [start, start + count) into caller-owned planar buffers: out[c] receives
   * channel c, length >= count for real data or >= 2·count (re, im interleaved) for complex.
   * Resolves to the number of frames read (fewer only at the end of the recording).
   */
  read(start: number, count: number, out: Float64Array[]): Promise<number>;
  close(): Promise<void>;
}
