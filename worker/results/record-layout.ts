/**
 * Layout of one window's record in windows.f32: every array of the engine's WindowResult,
 * converted to float32 and laid end to end in a fixed order. Sizes follow from the job's setup
 * alone, so window j starts at byte j·bytesPerWindow and a reader can seek straight to it.
 *
 * The order puts the small per-window summary fields first (broadband powers and SINR,
 * per-bin diagnostics, eigenvalues) so the plots API reads a short contiguous prefix; the large
 * per-bin-and-beam arrays and the weights follow. float32 keeps about 7 significant digits,
 * more than any recording's dynamic range justifies, at half the disk of float64.
 */
import type { WindowResult } from '../dsp/window-engine.types.js';

export type RecordFieldName = keyof WindowResult;

/** Axis names of a field, outermost first (row-major). */
export type RecordAxis = 'beam' | 'bin' | 'saved' | 'channel' | 'reim' | 'rank';

export interface RecordField {
  name: RecordFieldName;
  /** Offset from the start of the record, in float32 values. */
  offset: number;
  /** Number of float32 values. */
  length: number;
  axes: RecordAxis[];
  unit: string;
}

export interface RecordLayout {
  valueType: 'float32';
  byteOrder: 'little-endian';
  floatsPerWindow: number;
  bytesPerWindow: number;
  fields: RecordField[];
}

export interface RecordDims {
  bins: number;
  beams: number;
  saved: number;
  channels: number;
}

const FIELD_ORDER: { name: RecordFieldName; axes: RecordAxis[]; unit: string }[] = [
  { name: 'broadbandAdaptivePower', axes: ['beam'], unit: 'linear power, sum over bins' },
  { name: 'broadbandConventionalPower', axes: ['beam'], unit: 'linear power, sum over bins' },
  { name: 'broadbandSinr', axes: ['beam'], unit: 'linear ratio' },
  { name: 'loading', axes: ['bin'], unit: 'delta, linear, units of R' },
  { name: 'notPositiveDefinite', axes: ['bin'], unit: '1 = covariance not positive definite' },
  { name: 'noiseFloor', axes: ['bin'], unit: 'linear power' },
  { name: 'mpUpperEdge', axes: ['bin'], unit: 'linear power' },
  { name: 'eigenvaluesAboveEdge', axes: ['bin'], unit: 'count' },
  { name: 'conditionNumber', axes: ['bin'], unit: 'ratio' },
  { name: 'eigenvalues', axes: ['bin', 'rank'], unit: 'linear power, descending' },
  { name: 'adaptivePower', axes: ['bin', 'beam'], unit: 'linear power' },
  { name: 'conventionalPower', axes: ['bin', 'beam'], unit: 'linear power' },
  { name: 'wng', axes: ['bin', 'beam'], unit: 'linear ratio' },
  { name: 'sinr', axes: ['bin', 'beam'], unit: 'linear ratio' },
  { name: 'sinrLow', axes: ['bin', 'beam'], unit: 'linear ratio' },
  { name: 'sinrHigh', axes: ['bin', 'beam'], unit: 'linear ratio' },
  { name: 'weights', axes: ['bin', 'saved', 'channel', 'reim'], unit: 'complex weight (re, im)' },
];

function axisSize(axis: RecordAxis, d: RecordDims): number {
  switch (axis) {
    case 'beam':
      return d.beams;
    case 'bin':
      return d.bins;
    case 'saved':
      return d.saved;
    case 'channel':
    case 'rank':
      return d.channels;
    case 'reim':
      return 2;
  }
}

export function recordLayout(d: RecordDims): RecordLayout {
  let offset = 0;
  const fields = FIELD_ORDER.map((f) => {
    const length = f.axes.reduce((n, a) => n * axisSize(a, d), 1);
    const field: RecordField = { name: f.name, offset, length, axes: f.axes, unit: f.unit };
    offset += length;
    return field;
  });
  return { valueType: 'float32', byteOrder: 'little-endian', floatsPerWindow: offset, bytesPerWindow: offset * 4, fields };
}

export function fieldOf(layout: RecordLayout, name: RecordFieldName): RecordField {
  const f = layout.fields.find((x) => x.name === name);
  if (!f) throw new Error(`the result files have no field "${name}"; they were written by another Nullsmith version`);
  return f;
}

/** Packs a WindowResult into a float32 record (caller-owned, length floatsPerWindow). No allocation. */
export function packWindowResult(layout: RecordLayout, result: WindowResult, record: Float32Array): void {
  for (const f of layout.fields) {
    const src = result[f.name];
    if (src.length !== f.length) {
      throw new RangeError(`window result field ${f.name} has ${src.length} values but the record layout expects ${f.length}`);
    }
    const off = f.offset;
    for (let i = 0; i < f.length; i++) record[off + i] = src[i];
  }
}
