/**
 * Builds RIFF/WAVE and RF64 headers for streaming writers (sizes are known up front, so the
 * header is written once). Layout per Microsoft WAVEFORMATEXTENSIBLE and EBU Tech 3306: more
 * than two channels or more than 16 bits use WAVE_FORMAT_EXTENSIBLE with a KSDATAFORMAT
 * SubFormat GUID and a zero speaker mask (array channels are not loudspeakers).
 */
import type { WritableEncoding } from './sample-encoder.js';

export interface WavHeaderSpec {
  container: 'wav' | 'rf64';
  channels: number;
  sampleRate: number;
  encoding: WritableEncoding;
  frames: number;
}

const BITS: Record<WritableEncoding, number> = { i16: 16, i24: 24, i32: 32, f32: 32 };
/** Largest total file size a plain RIFF can state (u32 size field + 8). */
export const RIFF_MAX_FILE_BYTES = 0xffffffff + 8 - 1;

export function wavDataBytes(spec: WavHeaderSpec): number {
  return spec.frames * spec.channels * (BITS[spec.encoding] / 8);
}

/** The header bytes; samples follow immediately, then one pad byte if the data size is odd. */
export function buildWavHeader(spec: WavHeaderSpec): Uint8Array {
  const bits = BITS[spec.encoding];
  const isFloat = spec.encoding === 'f32';
  const extensible = spec.channels > 2 || bits > 16;
  const fmtSize = extensible ? 40 : isFloat ? 18 : 16;
  const factSize = isFloat ? 12 : 0;
  const ds64Size = spec.container === 'rf64' ? 36 : 0;
  const headerBytes = 12 + ds64Size + 8 + fmtSize + factSize + 8;
  const dataBytes = wavDataBytes(spec);
  const total = headerBytes + dataBytes + (dataBytes & 1);
  if (spec.container === 'wav' && total > RIFF_MAX_FILE_BYTES) throw new RangeError(`A RIFF WAV holds at most 4 GiB; this one needs ${total} bytes. Write RF64 instead.`);
  const b = new Uint8Array(headerBytes);
  const v = new DataView(b.buffer);
  let p = 0;
  const id = (s: string): void => {
    for (let i = 0; i < 4; i++) b[p + i] = s.charCodeAt(i);
    p += 4;
  };
  const u16 = (x: number): void => { v.setUint16(p, x, true); p += 2; };
  const u32 = (x: number): void => { v.setUint32(p, x, true); p += 4; };
  const u64 = (x: number): void => { v.setUint32(p, x % 0x100000000, true); v.setUint32(p + 4, Math.floor(x / 0x100000000), true); p += 8; };
  if (spec.container === 'rf64') {
    id('RF64'); u32(0xffffffff); id('WAVE');
    id('ds64'); u32(28); u64(total - 8); u64(dataBytes); u64(spec.frames); u32(0);
  } else {
    id('RIFF'); u32(total - 8); id('WAVE');
  }
  const blockAlign = (spec.channels * bits) / 8;
  id('fmt '); u32(fmtSize);
  u16(extensible ? 0xfffe : isFloat ? 3 : 1);
  u16(spec.channels); u32(spec.sampleRate); u32(spec.sampleRate * blockAlign); u16(blockAlign); u16(bits);
  if (extensible) {
    u16(22); u16(bits); u32(0);
    u16(isFloat ? 3 : 1);
    for (const x of [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71]) b[p++] = x;
  } else if (isFloat) {
    u16(0);
  }
  if (isFloat) { id('fact'); u32(4); u32(Math.min(spec.frames, 0xffffffff)); }
  id('data'); u32(spec.container === 'rf64' ? 0xffffffff : dataBytes);
  return b;
}
