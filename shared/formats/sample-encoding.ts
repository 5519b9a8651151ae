/**
 * Sample encodings Nullsmith converts to float64, and the SigMF datatype grammar
 * (SigMF core specification v1.2: `(r|c)(f32|f64|i32|i16|u32|u16)(_le|_be)` or `(r|c)(i8|u8)`),
 * which the raw side file reuses. The grammar is recognised in full so that a valid but
 * unsupported type (u16, u32) is refused by name rather than as "unknown".
 */
import { RecordingFormatError } from './recording-format-error.js';

export const SAMPLE_ENCODINGS = ['u8', 'i8', 'i16', 'i24', 'i32', 'f32', 'f64'] as const;
export type SampleEncoding = (typeof SAMPLE_ENCODINGS)[number];

/** Bytes per real component. */
export const ENCODING_BYTES: Readonly<Record<SampleEncoding, number>> = { u8: 1, i8: 1, i16: 2, i24: 3, i32: 4, f32: 4, f64: 8 };

/**
 * Divisor that maps integer codes to full scale ±1 (CONVENTIONS.md "Time-frequency"):
 * 16-bit /32768, 24-bit /8388608, 32-bit /2^31; unsigned 8-bit is (x − 128)/128 (WAV practice,
 * DOMAIN.md §4 marks the signedness [M]); signed 8-bit /128 by the same rule; floats as stored.
 */
export const ENCODING_FULL_SCALE: Readonly<Record<SampleEncoding, number>> = {
  u8: 128,
  i8: 128,
  i16: 32768,
  i24: 8388608,
  i32: 2147483648,
  f32: 1,
  f64: 1,
};

export interface ParsedDatatype {
  complex: boolean;
  encoding: SampleEncoding;
  littleEndian: boolean;
  /** The datatype in canonical SigMF spelling, e.g. "ci16_le". */
  datatype: string;
}

const GRAMMAR = /^([rc])(?:(f32|f64|i32|i16|u32|u16)(_le|_be)|(i8|u8))$/;
const MULTIBYTE_NO_ENDIAN = /^([rc])(f32|f64|i32|i16|u32|u16)$/;

/**
 * Parses a SigMF datatype string. `where` names the field for the error (e.g.
 * "global.core:datatype" or "datatype").
 */
export function parseSigmfDatatype(value: unknown, fileName: string, where: string): ParsedDatatype {
  if (typeof value !== 'string') {
    throw new RecordingFormatError(fileName, null, where, `${where} must be a text such as "ri16_le" or "cf32_le", not ${describeJson(value)}`, 'Set the datatype to one of the SigMF datatype strings.');
  }
  const text = value.trim();
  const m = GRAMMAR.exec(text);
  if (!m) {
    if (MULTIBYTE_NO_ENDIAN.test(text)) {
      throw new RecordingFormatError(fileName, null, where, `datatype "${text}" is a multi-byte type without a byte order`, `Append "_le" (little-endian, the usual case) or "_be", e.g. "${text}_le".`);
    }
    throw new RecordingFormatError(
      fileName,
      null,
      where,
      `datatype "${clip(text)}" is not a SigMF datatype`,
      'Use r (real) or c (complex) + f32|f64|i32|i16|u32|u16 + _le|_be, or ri8/ru8/ci8/cu8, e.g. "ri16_le" or "cf32_le".',
    );
  }
  const complex = m[1] === 'c';
  const base = (m[2] ?? m[4]) as string;
  if (base === 'u16' || base === 'u32') {
    throw new RecordingFormatError(fileName, null, where, `datatype "${text}" (unsigned ${base.slice(1)}-bit) is valid SigMF but Nullsmith does not read it`, 'Convert the samples to signed integers (i16/i32) or float (f32), which keeps zero signal at code 0.');
  }
  const encoding = base as SampleEncoding;
  const littleEndian = m[3] === undefined ? true : m[3] === '_le';
  return { complex, encoding, littleEndian, datatype: text };
}

/** Canonical SigMF-style datatype for an encoding (used to describe WAV files the same way). */
export function datatypeOf(complex: boolean, encoding: SampleEncoding, littleEndian: boolean): string {
  const prefix = complex ? 'c' : 'r';
  if (encoding === 'u8' || encoding === 'i8') return prefix + encoding;
  return `${prefix}${encoding}${littleEndian ? '_le' : '_be'}`;
}

export function describeJson(value: unknown): string {
  if (value === undefined) return 'missing';
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list';
  if (typeof value === 'string') return `"${clip(value)}"`;
  if (typeof value === 'object') return 'an object';
  return String(value);
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 37)}...` : s;
}
