/**
 * Float64 (full scale = 1) to stored codes, the inverse of CONVENTIONS.md's conversion:
 * round to nearest, saturate at the most negative/positive code and count what saturated.
 */
import { ENCODING_BYTES, type SampleEncoding } from '../../shared/formats/sample-encoding.js';

export type WritableEncoding = Extract<SampleEncoding, 'i16' | 'i24' | 'i32' | 'f32'>;

export class SampleEncoder {
  readonly bytes: number;
  /** Values that hit full scale (integer) or exceeded ±1 (float) so far. */
  clipped = 0;
  private readonly i16: Int16Array;
  private readonly i32: Int32Array;
  private readonly f32: Float32Array;

  /** `buffer` must be its own ArrayBuffer (offset 0), host little-endian (checked). */
  constructor(
    readonly buffer: Buffer,
    readonly encoding: WritableEncoding,
  ) {
    if (new Uint8Array(new Uint16Array([1]).buffer)[0] !== 1) throw new Error('The sample writer assumes a little-endian host.');
    if (buffer.byteOffset % 8 !== 0) throw new Error('The encode buffer must start on an 8-byte boundary.');
    this.bytes = ENCODING_BYTES[encoding];
    this.i16 = new Int16Array(buffer.buffer, buffer.byteOffset, Math.floor(buffer.length / 2));
    this.i32 = new Int32Array(buffer.buffer, buffer.byteOffset, Math.floor(buffer.length / 4));
    this.f32 = new Float32Array(buffer.buffer, buffer.byteOffset, Math.floor(buffer.length / 4));
  }

  /** Encodes src[srcIndex + j·srcStep] (j < count) to components first + j·stride of the buffer. */
  encodeRun(src: Float64Array, srcIndex: number, srcStep: number, count: number, first: number, stride: number): void {
    let s = srcIndex;
    let d = first;
    let clipped = 0;
    switch (this.encoding) {
      case 'i16': {
        const out = this.i16;
        for (let j = 0; j < count; j++, s += srcStep, d += stride) {
          let v = Math.round(src[s] * 32768);
          if (v > 32767) { v = 32767; clipped++; } else if (v < -32768) { v = -32768; clipped++; }
          out[d] = v;
        }
        break;
      }
      case 'i24': {
        const out = this.buffer;
        for (let j = 0; j < count; j++, s += srcStep, d += stride) {
          let v = Math.round(src[s] * 8388608);
          if (v > 8388607) { v = 8388607; clipped++; } else if (v < -8388608) { v = -8388608; clipped++; }
          const p = d * 3;
          out[p] = v & 0xff;
          out[p + 1] = (v >> 8) & 0xff;
          out[p + 2] = (v >> 16) & 0xff;
        }
        break;
      }
      case 'i32': {
        const out = this.i32;
        for (let j = 0; j < count; j++, s += srcStep, d += stride) {
          let v = Math.round(src[s] * 2147483648);
          if (v > 2147483647) { v = 2147483647; clipped++; } else if (v < -2147483648) { v = -2147483648; clipped++; }
          out[d] = v;
        }
        break;
      }
      case 'f32': {
        const out = this.f32;
        for (let j = 0; j < count; j++, s += srcStep, d += stride) {
          const v = src[s];
          if (v > 1 || v < -1) clipped++;
          out[d] = v;
        }
        break;
      }
    }
    this.clipped += clipped;
  }
}
