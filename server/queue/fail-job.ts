import { and, eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { backoffIntervalSql, type BackoffPolicy } from './backoff.js';
import { recordJobEvent } from './record-job-event.js';
import { movableTo } from './transitions.js';

/**
 * Ends a failed attempt of a running job held by `nodeId`.
 * - permanent (bad file, invalid parameters): failed at once; retrying cannot help.
 * - transient (child crashed, disk hiccup): back to 'scheduled' after a capped, jittered
 *   back-off while attempts remain, else failed with the last reason.
 * The checkpoint is kept, so the retry resumes after the last flushed window.
 */
export async function failJob(
  db: AppDb,
  jobId: number,
  nodeId: string,
  failure: { message: string; permanent: boolean },
  policy: BackoffPolicy,
): Promise<JobRow | undefined> {
  return db.transaction(async (tx) => {
    const giveUp = failure.permanent ? sql`true` : sql`${jobs.attempts} >= ${jobs.maxAttempts}`;
    const [job] = await tx
      .update(jobs)
      .set({
        state: sql`case when ${giveUp} then 'failed'::job_state else 'scheduled'::job_state end`,
        runAfter: sql`case when ${giveUp} then ${jobs.runAfter} else now() + ${backoffIntervalSql(sql`${jobs.attempts}`, policy)} end`,
        claimedBy: null,
        leaseExpiresAt: null,
        lastError: failure.message,
        windowsPerSecond: null,
        etaSeconds: null,
        finishedAt: sql`case when ${giveUp} then now() else null end`,
        updatedAt: sql`now()`,
      })
      .where(and(eq(jobs.id, jobId), eq(jobs.claimedBy, nodeId), movableTo('failed'), movableTo('scheduled')))
      .returning();
    if (job) {
      await recordJobEvent(tx, {
        jobId,
        from: 'running',
        to: job.state,
        actor: `node:${nodeId}`,
        message: job.state === 'failed' ? failure.message : `attempt ${job.attempts} failed, retrying after ${job.runAfter.toISOString()}: ${failure.message}`,
      });
    }
    return job;
  });
}
