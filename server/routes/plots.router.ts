import { Router } from 'express';
import * as z from 'zod';
import type { BeamWeights, EigenSpectrum, RunInfo, WindowRow } from '../../shared/api/results.js';
import { requireUser } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';
import { csvDb, toWindowSummaryDto } from '../live/window-summary-dto.js';
import { significant } from '../../worker/results/csv-number-format.js';
import { ResultReader } from '../../worker/results/result-reader.js';
import { readWindowSummaries } from '../../worker/results/window-summaries.js';
import { asBadRequest, storedResults } from './results-access.js';

/** Most windows one plot-data call returns; longer jobs are read with a stride or in pages. */
export const MAX_PLOT_WINDOWS = 2000;

const whole = (what: string) => z.coerce.number({ error: `${what} must be a whole number` }).int(`${what} must be a whole number`).min(0, `${what} must be 0 or more`);
const rangeSchema = z.object({
  fromWindow: whole('fromWindow').optional(),
  toWindow: whole('toWindow').optional(),
  stride: z.coerce.number({ error: 'stride must be a whole number' }).int('stride must be a whole number').min(1, 'stride must be 1 or more').default(1),
});
const cellSchema = z.object({ window: whole('window'), bin: whole('bin') });
const weightsSchema = cellSchema.extend({ beam: whole('beam') });

async function withReader<T>(dir: string, fn: (r: ResultReader) => Promise<T>): Promise<T> {
  const reader = await ResultReader.open(dir).catch(asBadRequest);
  try {
    return await fn(reader).catch(asBadRequest);
  } finally {
    await reader.close();
  }
}

function checkCell(r: ResultReader, lastWindow: number, window: number, bin: number): void {
  if (window > lastWindow) throw new HttpError(400, 'bad_result_query', `Window ${window} is not stored yet: windows 0..${lastWindow} are.`);
  const bins = r.header.setup.bins.length;
  if (bin >= bins) throw new HttpError(400, 'bad_result_query', `Bin ${bin} does not exist: this job processed bins 0..${bins - 1} (positions in run.json setup.bins).`);
}

function checkRange(q: z.infer<typeof rangeSchema>, lastWindow: number): { from: number; to: number } {
  const from = q.fromWindow ?? 0;
  const to = Math.min(q.toWindow ?? lastWindow, lastWindow);
  if (from > lastWindow) throw new HttpError(400, 'bad_result_query', `fromWindow ${from} is not stored yet: windows 0..${lastWindow} are.`);
  if (to < from) throw new HttpError(400, 'bad_result_query', `toWindow (${to}) is before fromWindow (${from}).`);
  const count = Math.floor((to - from) / q.stride) + 1;
  if (count > MAX_PLOT_WINDOWS) {
    throw new HttpError(400, 'bad_result_query', `That is ${count} windows; ask for at most ${MAX_PLOT_WINDOWS} per call (use stride=${Math.ceil((to - from + 1) / MAX_PLOT_WINDOWS)} or a shorter range).`);
  }
  return { from, to };
}

/**
 * /api/plots: the data behind the results page, read straight from the job's result files:
 * run description, per-window broadband summaries (bearing–time map, SINR track), one
 * window's eigen spectrum with its Marchenko–Pastur band, one saved beam's weights (the
 * browser draws the adapted pattern from them), and the per-window table. Values are the
 * CSV's (same rounding), never past the committed checkpoint.
 */
export function plotsRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/:id/run', async (req, res) => {
    const { job, dir, lastWindow } = await storedResults(ctx, req.params.id);
    const body = await withReader(dir, async (r) => {
      const h = r.header;
      const info: RunInfo = {
        jobId: job.id,
        product: h.product,
        conventionsVersion: h.conventionsVersion,
        caution: h.caution,
        params: h.params as unknown as Record<string, unknown>,
        recording: h.recording,
        setup: { ...h.setup, loading: h.setup.loading as unknown as Record<string, unknown> },
        timing: h.timing as unknown as Record<string, unknown>,
        meta: h.meta,
        windowsStored: Math.min(r.windowsStored, lastWindow + 1),
        totalWindows: h.timing.windows,
      };
      return info;
    });
    res.json(body);
  });

  router.get('/:id/windows', async (req, res) => {
    const { job, dir, lastWindow } = await storedResults(ctx, req.params.id);
    const q = rangeSchema.parse(req.query);
    const { from, to } = checkRange(q, lastWindow);
    const page = await readWindowSummaries(dir, { fromWindow: from, toWindow: to, stride: q.stride }).catch(asBadRequest);
    res.json({ jobId: job.id, windowsStored: lastWindow + 1, totalWindows: page.totalWindows, windows: page.summaries.map(toWindowSummaryDto) });
  });

  router.get('/:id/eigen', async (req, res) => {
    const { dir, lastWindow } = await storedResults(ctx, req.params.id);
    const { window, bin } = cellSchema.parse(req.query);
    const body = await withReader(dir, async (r) => {
      checkCell(r, lastWindow, window, bin);
      const n = r.header.setup.channels;
      const k = r.header.setup.effectiveSnapshots;
      const read = async (name: 'eigenvalues' | 'noiseFloor' | 'mpUpperEdge' | 'eigenvaluesAboveEdge' | 'conditionNumber' | 'loading', count: number, at: number) => {
        const f = r.field(name);
        const out = new Float32Array(count);
        await r.readSlice(window, f.offset + at, count, out);
        return out;
      };
      const eig = await read('eigenvalues', n, bin * n);
      const [floor] = await read('noiseFloor', 1, bin);
      const [upper] = await read('mpUpperEdge', 1, bin);
      const [above] = await read('eigenvaluesAboveEdge', 1, bin);
      const [cond] = await read('conditionNumber', 1, bin);
      const [loading] = await read('loading', 1, bin);
      const c = Math.min(1, n / k);
      const spectrum: EigenSpectrum = {
        window,
        bin,
        freqHz: r.header.setup.binFreqsHz[bin],
        eigenvalues: Array.from(eig, (x) => Number(significant(x)) || 0),
        noiseFloor: Number(significant(floor)) || 0,
        // MP band of white noise with the estimated floor (Marchenko & Pastur 1967; DOMAIN.md §3.5)
        mpLower: Number(significant(floor * (1 - Math.sqrt(c)) ** 2)) || 0,
        mpUpper: Number(significant(upper)) || 0,
        aboveEdge: Math.round(above),
        conditionNumber: Number.isFinite(cond) ? Number(significant(cond)) : null,
        loading: Number(significant(loading)) || 0,
        n,
        k,
      };
      return spectrum;
    });
    res.json(body);
  });

  router.get('/:id/weights', async (req, res) => {
    const { dir, lastWindow } = await storedResults(ctx, req.params.id);
    const { window, bin, beam } = weightsSchema.parse(req.query);
    const body = await withReader(dir, async (r) => {
      checkCell(r, lastWindow, window, bin);
      const s = r.header.setup;
      const slot = s.savedBeams.indexOf(beam);
      if (slot < 0) {
        const list = s.savedBeams.map((b) => `${b} (${s.azimuthsDeg[b]}°)`).join(', ') || 'none';
        throw new HttpError(400, 'bad_result_query', `Beam ${beam} has no saved weights; saved beams are ${list}. Rerun the job with that beam in "beams to save".`);
      }
      const f = r.field('weights');
      const n = s.channels;
      const out = new Float32Array(2 * n);
      await r.readSlice(window, f.offset + (bin * s.savedBeams.length + slot) * n * 2, 2 * n, out);
      const weights: [number, number][] = [];
      for (let i = 0; i < n; i++) weights.push([Number(significant(out[2 * i])) || 0, Number(significant(out[2 * i + 1])) || 0]);
      const w: BeamWeights = {
        window,
        bin,
        beam,
        freqHz: s.binFreqsHz[bin],
        azimuthDeg: s.azimuthsDeg[beam],
        elevationDeg: s.elevationsDeg[beam],
        speedMps: s.speedMps,
        positionsM: s.positionsM,
        weights,
      };
      return w;
    });
    res.json(body);
  });

  router.get('/:id/table', async (req, res) => {
    const { dir, lastWindow } = await storedResults(ctx, req.params.id);
    const q = rangeSchema.parse(req.query);
    const { from, to } = checkRange(q, lastWindow);
    const rows = await withReader(dir, async (r) => {
      const s = r.header.setup;
      const nBeams = s.azimuthsDeg.length;
      const nBins = s.bins.length;
      const at = (name: Parameters<ResultReader['field']>[0]) => r.field(name).offset;
      const oA = at('broadbandAdaptivePower');
      const oS = at('broadbandSinr');
      const oPd = at('notPositiveDefinite');
      const oAbove = at('eigenvaluesAboveEdge');
      const prefix = at('eigenvalues');
      const buf = new Float32Array(prefix);
      const out: WindowRow[] = [];
      for (let j = from; j <= to; j += q.stride) {
        await r.readSlice(j, 0, prefix, buf);
        let peak = -1;
        let best = -1;
        for (let b = 0; b < nBeams; b++) {
          if (buf[oA + b] > 0 && (peak < 0 || buf[oA + b] > buf[oA + peak])) peak = b;
          if (buf[oS + b] > 0 && (best < 0 || buf[oS + b] > buf[oS + best])) best = b;
        }
        let maxAbove = 0;
        let singular = 0;
        for (let f = 0; f < nBins; f++) {
          maxAbove = Math.max(maxAbove, Math.round(buf[oAbove + f]));
          if (buf[oPd + f] > 0) singular++;
        }
        const span = r.span(j);
        out.push({
          window: j,
          tStartS: span.startS,
          tEndS: span.endS,
          peakAzimuthDeg: peak < 0 ? null : s.azimuthsDeg[peak],
          peakPowerDb: peak < 0 ? null : csvDb(buf[oA + peak]),
          bestSinrDb: best < 0 ? null : csvDb(buf[oS + best]),
          bestSinrAzimuthDeg: best < 0 ? null : s.azimuthsDeg[best],
          maxAboveEdge: maxAbove,
          singularBins: singular,
        });
      }
      return out;
    });
    res.json({ windowsStored: lastWindow + 1, rows });
  });

  return router;
}
