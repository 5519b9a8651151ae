import type { WindowSummaryDto } from '../../../shared/api/live.js';

/** Merges newly arrived windows into a list ordered by window index, without duplicates. */
export function mergeWindows(have: WindowSummaryDto[], incoming: WindowSummaryDto[]): WindowSummaryDto[] {
  const next = incoming.filter((w) => w.window >= have.length);
  if (!next.length) return have;
  const out = have.slice();
  for (const w of next) if (w.window === out.length) out.push(w);
  return out;
}

/** dB of a linear power (null for non-positive values). */
export const toDb = (x: number): number | null => (x > 0 ? 10 * Math.log10(x) : null);

/** "window 12 · 3.20–4.21 s" */
export function windowLabel(w: WindowSummaryDto | undefined): string {
  return w ? `window ${w.window} · ${w.tStartS.toFixed(2)}–${w.tEndS.toFixed(2)} s` : '';
}
