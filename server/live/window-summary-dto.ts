import type { WindowSummaryDto } from '../../shared/api/live.js';
import { decibels } from '../../worker/results/csv-number-format.js';
import type { WindowSummary } from '../../worker/results/window-summaries.js';

/** A number as the CSV writes it (same rounding), or null where the CSV leaves the field empty. */
export function csvDb(x: number): number | null {
  const s = decibels(x);
  return s === '' ? null : Number(s);
}

const dbList = (a: Float32Array): (number | null)[] => Array.from(a, csvDb);

/** The plot/live view of one stored window (broadband values per beam in dB). */
export function toWindowSummaryDto(s: WindowSummary): WindowSummaryDto {
  return {
    window: s.window,
    tStartS: s.tStartS,
    tEndS: s.tEndS,
    adaptiveDb: dbList(s.broadbandAdaptivePower),
    conventionalDb: dbList(s.broadbandConventionalPower),
    sinrDb: dbList(s.broadbandSinr),
  };
}
