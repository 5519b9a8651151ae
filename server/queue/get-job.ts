import { eq } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { jobNotFound } from './queue-errors.js';

/** The job row, or a 404 HttpError naming the id. */
export async function getJob(db: AppDb, jobId: number): Promise<JobRow> {
  const [job] = await db.select().from(jobs).where(eq(jobs.id, jobId));
  if (!job) throw jobNotFound(jobId);
  return job;
}
