import { eq, sql } from 'drizzle-orm';
import { isFinalJobState } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { actorLabel, type Actor } from './actor.js';
import { jobAlreadyFinal, jobNotFound } from './queue-errors.js';
import { recordJobEvent } from './record-job-event.js';
import { movableTo } from './transitions.js';
import { writeAudit } from './write-audit.js';

/**
 * Cancels a job. Queued or scheduled: cancelled at once. Running: the cancel flag is set; the
 * node holding the lease sees it (at once on this process, else at its next lease renewal),
 * tells its compute child to stop between windows, and keeps the windows already written
 * (acknowledgeCancel marks the job partial). `immediate` says which happened.
 */
export async function cancelJob(db: AppDb, jobId: number, actor: Actor): Promise<{ job: JobRow; immediate: boolean }> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).for('update');
    if (!before) throw jobNotFound(jobId);
    if (isFinalJobState(before.state)) throw jobAlreadyFinal(jobId, before.state);
    let job: JobRow;
    let immediate: boolean;
    if (before.state === 'running') {
      [job] = await tx.update(jobs).set({ cancelRequested: true, updatedAt: sql`now()` }).where(eq(jobs.id, jobId)).returning();
      immediate = false;
    } else {
      [job] = await tx
        .update(jobs)
        .set({ state: 'cancelled', cancelRequested: true, finishedAt: sql`now()`, updatedAt: sql`now()` })
        .where(sql`${jobs.id} = ${jobId} and ${movableTo('cancelled')}`)
        .returning();
      immediate = true;
      await recordJobEvent(tx, { jobId, from: before.state, to: 'cancelled', actor: actorLabel(actor), message: 'cancelled before it ran' });
    }
    await writeAudit(tx, {
      actor,
      action: 'job.cancel',
      target: `job:${jobId}`,
      before: { state: before.state, cancelRequested: before.cancelRequested },
      after: { state: job.state, cancelRequested: job.cancelRequested },
    });
    return { job, immediate };
  });
}
