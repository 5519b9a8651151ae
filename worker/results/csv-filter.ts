/**
 * Which part of a job's results a CSV export covers: a window range, some beams, some bins.
 * Resolved against run.json before the first byte is streamed, so a bad filter is a clear
 * error and never a half-written download.
 */
import type { ResultHeader } from './result-header.js';
import { ResultFilesError } from './result-header.js';

export interface CsvFilter {
  /** First and last window (inclusive); default all stored windows. */
  fromWindow?: number;
  toWindow?: number;
  /** Beam indices into the fan (run.json setup.azimuthsDeg order); default all (saved beams for weights). */
  beams?: number[];
  /** Positions in run.json setup.bins (0 = lowest processed frequency); default all. */
  bins?: number[];
  /**
   * Lead the file with `# ` comment lines (product, conventions, caution). Default true: the
   * caution travels with the data. Pass false for tools that cannot skip comment lines;
   * run.json still carries the same text.
   */
  comments?: boolean;
}

export interface ResolvedFilter {
  fromWindow: number;
  toWindow: number;
  beams: number[];
  bins: number[];
  comments: boolean;
}

export class CsvFilterError extends ResultFilesError {}

function checkIndices(list: number[] | undefined, count: number, what: string): number[] {
  if (!list) return Array.from({ length: count }, (_, i) => i);
  for (const i of list) {
    if (!Number.isInteger(i) || i < 0 || i >= count) throw new CsvFilterError(`${what} ${i} does not exist: this job has ${what}s 0..${count - 1}`);
  }
  return [...new Set(list)].sort((a, b) => a - b);
}

export function resolveFilter(header: ResultHeader, windowsStored: number, f: CsvFilter = {}): ResolvedFilter {
  const last = windowsStored - 1;
  const fromWindow = f.fromWindow ?? 0;
  const toWindow = f.toWindow ?? last;
  if (!Number.isInteger(fromWindow) || fromWindow < 0) throw new CsvFilterError(`fromWindow must be a whole number ≥ 0, got ${fromWindow}`);
  if (!Number.isInteger(toWindow)) throw new CsvFilterError(`toWindow must be a whole number, got ${toWindow}`);
  if (f.toWindow !== undefined && toWindow > last) {
    throw new CsvFilterError(`toWindow ${toWindow} is not stored yet: windows 0..${last} of ${header.timing.windows} are available`);
  }
  if (f.fromWindow !== undefined && f.toWindow !== undefined && toWindow < fromWindow) throw new CsvFilterError(`toWindow (${toWindow}) is before fromWindow (${fromWindow})`);
  return {
    fromWindow,
    toWindow,
    beams: checkIndices(f.beams, header.setup.azimuthsDeg.length, 'beam'),
    bins: checkIndices(f.bins, header.setup.bins.length, 'bin'),
    comments: f.comments ?? true,
  };
}

/** Beam indices for the given azimuths (and elevation, default the first of the fan), within 1e-6°. */
export function beamsAt(header: ResultHeader, azimuthsDeg: number[], elevationDeg = header.setup.elevationsDeg[0]): number[] {
  const { azimuthsDeg: az, elevationsDeg: el } = header.setup;
  return azimuthsDeg.map((a) => {
    const i = az.findIndex((x, b) => Math.abs(x - a) <= 1e-6 && Math.abs(el[b] - elevationDeg) <= 1e-6);
    if (i < 0) throw new CsvFilterError(`no beam looks at azimuth ${a}° / elevation ${elevationDeg}°; the fan has azimuths ${az[0]}°..${az[az.length - 1]}°`);
    return i;
  });
}

/** Bin positions whose frequency lies in [fLoHz, fHiHz]. */
export function binsBetween(header: ResultHeader, fLoHz: number, fHiHz: number): number[] {
  const out: number[] = [];
  header.setup.binFreqsHz.forEach((f, i) => {
    if (f >= fLoHz && f <= fHiHz) out.push(i);
  });
  if (out.length === 0) throw new CsvFilterError(`no processed bin lies in ${fLoHz}–${fHiHz} Hz; this job covers ${header.setup.binFreqsHz[0]}–${header.setup.binFreqsHz.at(-1)} Hz`);
  return out;
}
