import fs from 'node:fs';
import path from 'node:path';
import * as z from 'zod';
import type { AppContext } from '../context.js';
import type { JobRow } from '../db/schema/jobs.js';
import { HttpError } from '../http/http-error.js';
import { jobResultsDir } from '../nodes/beamform-payload.js';
import { getJob } from '../queue/get-job.js';
import { eq } from 'drizzle-orm';
import { resultPurges } from '../db/schema/retention.js';
import { HEADER_FILE, ResultFilesError } from '../../worker/results/result-header.js';

export const resultJobIdSchema = z.coerce
  .number({ error: 'The job id must be a whole number.' })
  .int('The job id must be a whole number.')
  .positive('The job id must be a positive number.');

/** A job whose result files exist, its results folder and the last committed window. */
export interface StoredResults {
  job: JobRow;
  dir: string;
  /** Windows 0..lastWindow are committed (never read past the checkpoint: a retry may rewrite later ones). */
  lastWindow: number;
}

/** Loads a job that has stored windows, or throws a 404/409 that says what to do. */
export async function storedResults(ctx: AppContext, rawId: unknown): Promise<StoredResults> {
  const job = await getJob(ctx.db, resultJobIdSchema.parse(rawId));
  const dir = jobResultsDir(ctx.config.resultsDir, job.id);
  if (!fs.existsSync(path.join(dir, HEADER_FILE)) || job.checkpointWindow === 0) {
    const [purge] = await ctx.db.select().from(resultPurges).where(eq(resultPurges.jobId, job.id));
    if (purge) {
      throw new HttpError(410, 'results_deleted', `Job ${job.id}'s results were deleted by the retention rule on ${purge.purgedAt.toISOString()} (${purge.reason}); re-run the job to get them again, and pin jobs whose results must be kept.`);
    }
    throw new HttpError(409, 'no_results_yet', `Job ${job.id} is ${job.state} and has no stored windows yet; results appear once its first windows are done.`);
  }
  return { job, dir, lastWindow: job.checkpointWindow - 1 };
}

/** Result-file problems (bad filter, window not stored) are the caller's to fix: 400 with the reader's words. */
export function asBadRequest(e: unknown): never {
  if (e instanceof ResultFilesError) throw new HttpError(400, 'bad_result_query', `${e.message.charAt(0).toUpperCase()}${e.message.slice(1)}.`);
  throw e;
}
