/**
 * Deterministic number formatting for CSV exports: the same stored float32 values always give
 * the same bytes (V8's toFixed/toPrecision are correctly rounded), so a resumed job's CSV is
 * byte-identical to an uninterrupted one. Missing values (NaN, ±∞, log of a non-positive
 * number) are written as empty fields, which every CSV reader treats as "no value".
 */

/** Fixed decimals with trailing zeros (and a bare point) stripped: 0.032000 → "0.032", 2.000 → "2". */
export function fixedTrimmed(x: number, decimals: number): string {
  if (!Number.isFinite(x)) return '';
  let s = x.toFixed(decimals);
  if (s.includes('.')) s = s.replace(/0+$/, '').replace(/\.$/, '');
  return s === '-0' ? '0' : s;
}

/**
 * Significant digits (7 by default: float32 carries 7.2), trailing zeros stripped, exponent kept
 * for very small or large magnitudes: 1.234560e-7 → "1.23456e-7".
 */
export function significant(x: number, digits = 7): string {
  if (!Number.isFinite(x)) return '';
  if (x === 0) return '0';
  const s = x.toPrecision(digits);
  const e = s.indexOf('e');
  const mantissa = e < 0 ? s : s.slice(0, e);
  const exponent = e < 0 ? '' : s.slice(e);
  const trimmed = mantissa.includes('.') ? mantissa.replace(/0+$/, '').replace(/\.$/, '') : mantissa;
  return trimmed + exponent;
}

/** 10·log10(x) with 3 decimals (milli-dB), empty where x ≤ 0 or missing. */
export function decibels(x: number): string {
  if (!(x > 0) || !Number.isFinite(x)) return '';
  return fixedTrimmed(10 * Math.log10(x), 3);
}
