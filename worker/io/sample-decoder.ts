/**
 * Converts stored sample codes to float64 per CONVENTIONS.md (integer codes divided by full
 * scale, unsigned 8-bit centred on 128, floats as stored), writing into caller-owned arrays.
 * Pure and allocation-free per call: the typed views over the reused read buffer are made once.
 *
 * Own code rather than a package: the npm WAV readers (e.g. wavefile) decode whole files into
 * new arrays, which breaks the bounded-memory streaming contract; this is a few typed-array
 * loops (bench/read-throughput.ts measures them).
 */
import { ENCODING_BYTES, ENCODING_FULL_SCALE, type SampleEncoding } from '../../shared/formats/sample-encoding.js';

type FastView = Int16Array | Int32Array | Float32Array | Float64Array | Uint8Array | Int8Array;

export class SampleDecoder {
  readonly componentBytes: number;
  /** Divide integer codes by this (1 for floats). */
  readonly fullScale: number;
  private readonly bias: number;
  private readonly fast: FastView | null;
  private readonly data: DataView;

  /** `buffer` must start at a byte offset that is a multiple of 8 (Buffer.allocUnsafeSlow gives 0). */
  constructor(
    readonly buffer: Uint8Array,
    readonly encoding: SampleEncoding,
    readonly littleEndian: boolean,
  ) {
    this.componentBytes = ENCODING_BYTES[encoding];
    this.fullScale = ENCODING_FULL_SCALE[encoding];
    this.bias = encoding === 'u8' ? 128 : 0;
    this.data = new DataView(buffer.buffer, buffer.byteOffset, buffer.byteLength);
    this.fast = SampleDecoder.fastView(buffer, encoding, littleEndian);
  }

  /**
   * dst[dstIndex + j·dstStep] = (component[first + j·stride] − bias) · gain / fullScale for
   * j < count, where components are counted from the start of the buffer.
   */
  decodeRun(first: number, stride: number, count: number, gain: number, dst: Float64Array, dstIndex: number, dstStep: number): void {
    const g = gain / this.fullScale;
    const fast = this.fast;
    if (fast !== null) {
      const bias = this.bias;
      let s = first;
      let d = dstIndex;
      if (bias === 0) {
        for (let j = 0; j < count; j++, s += stride, d += dstStep) dst[d] = fast[s] * g;
      } else {
        for (let j = 0; j < count; j++, s += stride, d += dstStep) dst[d] = (fast[s] - bias) * g;
      }
      return;
    }
    this.decodeRunSlow(first, stride, count, g, dst, dstIndex, dstStep);
  }

  /** 24-bit and big-endian samples: byte assembly through a DataView. */
  private decodeRunSlow(first: number, stride: number, count: number, g: number, dst: Float64Array, dstIndex: number, dstStep: number): void {
    const b = this.buffer;
    const v = this.data;
    const le = this.littleEndian;
    const w = this.componentBytes;
    let p = first * w;
    const step = stride * w;
    let d = dstIndex;
    switch (this.encoding) {
      case 'i24':
        if (le) {
          for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = (((b[p] | (b[p + 1] << 8) | (b[p + 2] << 16)) << 8) >> 8) * g;
        } else {
          for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = (((b[p + 2] | (b[p + 1] << 8) | (b[p] << 16)) << 8) >> 8) * g;
        }
        return;
      case 'i16':
        for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = v.getInt16(p, le) * g;
        return;
      case 'i32':
        for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = v.getInt32(p, le) * g;
        return;
      case 'f32':
        for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = v.getFloat32(p, le) * g;
        return;
      case 'f64':
        for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = v.getFloat64(p, le) * g;
        return;
      case 'u8':
        for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = (b[p] - 128) * g;
        return;
      case 'i8':
        for (let j = 0; j < count; j++, p += step, d += dstStep) dst[d] = v.getInt8(p) * g;
        return;
    }
  }

  private static fastView(buffer: Uint8Array, encoding: SampleEncoding, littleEndian: boolean): FastView | null {
    const ab = buffer.buffer;
    const off = buffer.byteOffset;
    const len = buffer.byteLength;
    if (encoding === 'u8') return buffer;
    if (encoding === 'i8') return new Int8Array(ab, off, len);
    const hostLittle = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
    if (littleEndian !== hostLittle) return null;
    const w = ENCODING_BYTES[encoding];
    if (off % 8 !== 0) return null;
    const n = Math.floor(len / w);
    switch (encoding) {
      case 'i16':
        return new Int16Array(ab, off, n);
      case 'i32':
        return new Int32Array(ab, off, n);
      case 'f32':
        return new Float32Array(ab, off, n);
      case 'f64':
        return new Float64Array(ab, off, n);
      default:
        return null;
    }
  }
}
