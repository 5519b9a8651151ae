/** Helpers for the format tests: files from the independent `wavefile` writer (npm) and chunk lookup. */
import wavefile from 'wavefile';
import { expect } from 'chai';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';

const { WaveFile } = wavefile as unknown as { WaveFile: new () => WaveFileLike };
interface WaveFileLike {
  fromScratch(ch: number, rate: number, bitDepth: string, samples: number[][]): void;
  fromBuffer(b: Uint8Array): void;
  toBuffer(): Uint8Array;
  getSamples(interleaved: boolean, ctor: Float64ArrayConstructor): Float64Array[];
}

/** A deterministic multichannel test signal in wavefile's integer/float codes. */
export function wavefileBytes(bitDepth: '8' | '16' | '24' | '32' | '32f' | '64', channels: number, frames: number, rate = 8000): Uint8Array {
  const full = { '8': 127, '16': 32767, '24': 8388607, '32': 2147483647, '32f': 1, '64': 1 }[bitDepth];
  const samples = Array.from({ length: channels }, (_, c) =>
    Array.from({ length: frames }, (_, i) => {
      const x = 0.9 * Math.sin(0.013 * (i + 1) * (c + 1) + c) * (i % 7 === 3 ? -1 : 1);
      if (bitDepth === '32f' || bitDepth === '64') return x;
      const v = Math.round(x * full);
      return bitDepth === '8' ? v + 128 : v;
    }),
  );
  const w = new WaveFile();
  w.fromScratch(channels, rate, bitDepth, samples);
  return w.toBuffer();
}

/** wavefile's own decode: per-channel codes (integers unscaled, floats as stored). */
export function wavefileDecode(bytes: Uint8Array): Float64Array[] {
  const w = new WaveFile();
  w.fromBuffer(bytes);
  const s = w.getSamples(false, Float64Array);
  return Array.isArray(s) || (s as unknown as Float64Array[])[0] instanceof Float64Array ? (s as Float64Array[]) : [s as unknown as Float64Array];
}

/** Offset of a chunk's 8-byte header in a RIFF byte array. */
export function chunkAt(bytes: Uint8Array, id: string): number {
  let p = 12;
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  while (p + 8 <= bytes.length) {
    const cid = String.fromCharCode(...bytes.subarray(p, p + 4));
    if (cid === id) return p;
    const size = v.getUint32(p + 4, true);
    p += 8 + size + (size & 1);
  }
  throw new Error(`chunk ${id} not found`);
}

export function view(bytes: Uint8Array): DataView {
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/** Asserts fn throws a RecordingFormatError naming the file, the offset (when given) and the problem. */
export function expectFormatError(fn: () => unknown, fileName: string, offset: number | null | undefined, ...fragments: RegExp[]): RecordingFormatError {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught, 'expected a RecordingFormatError').to.be.instanceOf(RecordingFormatError);
  const err = caught as RecordingFormatError;
  expect(err.fileName).to.equal(fileName);
  expect(err.message).to.include(fileName);
  if (offset !== undefined) {
    expect(err.byteOffset).to.equal(offset);
    if (offset !== null) expect(err.message).to.include(`@ byte ${offset}`);
  }
  for (const f of fragments) expect(err.message).to.match(f);
  expect(err.remedy.length).to.be.greaterThan(10);
  return err;
}
