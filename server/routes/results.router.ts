import zlib from 'node:zlib';
import { pipeline } from 'node:stream/promises';
import { Router, type RequestHandler } from 'express';
import * as z from 'zod';
import { requireUser } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';
import { createSinrCsvStream, createWeightsCsvStream } from '../../worker/results/csv-streams.js';
import { asBadRequest, storedResults } from './results-access.js';

const intList = (what: string) =>
  z
    .string()
    .regex(/^\d+(,\d+)*$/, `${what} must be comma-separated whole numbers, e.g. 0,3,7`)
    .transform((s) => s.split(',').map(Number))
    .optional();

const downloadQuerySchema = z.object({
  fromWindow: z.coerce.number({ error: 'fromWindow must be a whole number' }).int('fromWindow must be a whole number').min(0, 'fromWindow must be 0 or more').optional(),
  toWindow: z.coerce.number({ error: 'toWindow must be a whole number' }).int('toWindow must be a whole number').min(0, 'toWindow must be 0 or more').optional(),
  beams: intList('beams'),
  bins: intList('bins'),
  comments: z.enum(['on', 'off'], { error: 'comments must be "on" or "off"' }).optional(),
  gzip: z.enum(['on', 'off'], { error: 'gzip must be "on" or "off"' }).optional(),
});

/** A file-name-safe version of a job name: letters, digits and dashes, at most 40 characters. */
export function fileSlug(name: string): string {
  return (
    name
      .normalize('NFKD')
      .replace(/[^\w\s-]/g, '')
      .trim()
      .replace(/[\s_]+/g, '-')
      .replace(/-+/g, '-')
      .toLowerCase()
      .slice(0, 40)
      .replace(/-$/, '') || 'job'
  );
}

const csvStreams = { weights: createWeightsCsvStream, sinr: createSinrCsvStream } as const;

/**
 * The one CSV download handler, mounted at /api/results/:id/<kind>.csv and at
 * /api/jobs/:id/<kind>.csv (the path scripts use): filters, gzip, file name, partial headers.
 */
export function resultCsvHandler(ctx: AppContext, file: keyof typeof csvStreams): RequestHandler {
  const open = csvStreams[file];
  return async (req, res) => {
      const { job, dir, lastWindow } = await storedResults(ctx, req.params.id);
      const q = downloadQuerySchema.parse(req.query);
      if (q.toWindow !== undefined && q.toWindow > lastWindow) {
        throw new HttpError(400, 'bad_result_query', `toWindow ${q.toWindow} is not stored yet: windows 0..${lastWindow} of job ${job.id} are; ask again once it has run further.`);
      }
      const stream = await open(dir, {
        ...(q.fromWindow !== undefined ? { fromWindow: q.fromWindow } : {}),
        toWindow: q.toWindow ?? lastWindow,
        ...(q.beams ? { beams: q.beams } : {}),
        ...(q.bins ? { bins: q.bins } : {}),
        ...(q.comments ? { comments: q.comments === 'on' } : {}),
      }).catch(asBadRequest);
      const range = q.fromWindow !== undefined || q.toWindow !== undefined ? `-w${q.fromWindow ?? 0}-${q.toWindow ?? lastWindow}` : '';
      const name = `nullsmith-job-${job.id}-${fileSlug(job.name)}-${file}${range}.csv${q.gzip === 'on' ? '.gz' : ''}`;
      res.setHeader('Content-Disposition', `attachment; filename="${name}"`);
      res.setHeader('X-Nullsmith-Job-State', job.state);
      if (job.state !== 'succeeded') res.setHeader('X-Nullsmith-Partial', `windows 0..${lastWindow} of ${job.totalWindows ?? '?'}`);
      if (q.gzip === 'on') {
        res.setHeader('Content-Type', 'application/gzip');
        await pipeline(stream, zlib.createGzip({ level: 6 }), res);
      } else {
        res.setHeader('Content-Type', 'text/csv; charset=utf-8');
        await pipeline(stream, res);
      }
  };
}

/**
 * /api/results: weights.csv and sinr.csv downloads, filtered by window range, beams and bins,
 * optionally gzip-compressed (a .csv.gz file). Streamed with back-pressure from the result
 * files by the same code the CLI uses, so a download is byte-identical to the CLI's output
 * for the same filters; never past the committed checkpoint of a running job.
 */
export function resultsRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/:id/weights.csv', resultCsvHandler(ctx, 'weights'));
  router.get('/:id/sinr.csv', resultCsvHandler(ctx, 'sinr'));

  return router;
}
