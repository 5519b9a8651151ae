/**
 * Per-window summaries for plots (bearing–time map, SINR track, eigen spectrum): broadband
 * power and SINR per beam and sorted eigenvalues per bin, read from the contiguous prefix of
 * each record (see record-layout.ts), never the whole record.
 */
import { ResultReader } from './result-reader.js';
import { ResultFilesError } from './result-header.js';

export interface WindowSummary {
  window: number;
  tStartS: number;
  tEndS: number;
  /** Linear, per beam (run.json setup.azimuthsDeg order). */
  broadbandAdaptivePower: Float32Array;
  broadbandConventionalPower: Float32Array;
  broadbandSinr: Float32Array;
  /** Descending eigenvalues, [bin·N + rank]. */
  eigenvalues: Float32Array;
}

export interface SummaryQuery {
  fromWindow?: number;
  toWindow?: number;
  /** Read every `stride`-th window (for a coarse overview of a long job). Default 1. */
  stride?: number;
}

/** Largest number of windows one call returns; page through longer jobs. */
export const MAX_SUMMARY_WINDOWS = 20000;

export async function readWindowSummaries(dir: string, q: SummaryQuery = {}): Promise<{ windowsStored: number; totalWindows: number; summaries: WindowSummary[] }> {
  const reader = await ResultReader.open(dir);
  try {
    const from = q.fromWindow ?? 0;
    const to = Math.min(q.toWindow ?? reader.windowsStored - 1, reader.windowsStored - 1);
    const stride = q.stride ?? 1;
    if (!Number.isInteger(from) || from < 0) throw new ResultFilesError(`fromWindow must be a whole number ≥ 0, got ${from}`);
    if (!Number.isInteger(stride) || stride < 1) throw new ResultFilesError(`stride must be a whole number ≥ 1, got ${stride}`);
    const count = to >= from ? Math.floor((to - from) / stride) + 1 : 0;
    if (count > MAX_SUMMARY_WINDOWS) throw new ResultFilesError(`${count} windows requested; at most ${MAX_SUMMARY_WINDOWS} per call — use a larger stride or a shorter range`);

    const bbA = reader.field('broadbandAdaptivePower');
    const bbC = reader.field('broadbandConventionalPower');
    const bbS = reader.field('broadbandSinr');
    const eig = reader.field('eigenvalues');
    // One read per window covers the prefix from the first broadband field to the end of the eigenvalues.
    const start = Math.min(bbA.offset, bbC.offset, bbS.offset, eig.offset);
    const end = Math.max(bbA.offset + bbA.length, bbC.offset + bbC.length, bbS.offset + bbS.length, eig.offset + eig.length);
    const buf = new Float32Array(end - start);
    const summaries: WindowSummary[] = [];
    for (let j = from; j <= to; j += stride) {
      await reader.readSlice(j, start, end - start, buf);
      const span = reader.span(j);
      const slice = (f: { offset: number; length: number }) => buf.slice(f.offset - start, f.offset - start + f.length);
      summaries.push({
        window: j,
        tStartS: span.startS,
        tEndS: span.endS,
        broadbandAdaptivePower: slice(bbA),
        broadbandConventionalPower: slice(bbC),
        broadbandSinr: slice(bbS),
        eigenvalues: slice(eig),
      });
    }
    return { windowsStored: reader.windowsStored, totalWindows: reader.header.timing.windows, summaries };
  } finally {
    await reader.close();
  }
}
