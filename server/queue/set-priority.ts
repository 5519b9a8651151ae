import { eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import type { Actor } from './actor.js';
import { jobNotFound, jobNotQueued } from './queue-errors.js';
import { writeAudit } from './write-audit.js';

/**
 * Changes the priority of a waiting (queued or scheduled) job. A running or finished job's
 * priority no longer means anything, so that is refused (409) with a message saying what to do.
 */
export async function setPriority(db: AppDb, jobId: number, priority: number, actor: Actor): Promise<JobRow> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).for('update');
    if (!before) throw jobNotFound(jobId);
    if (!before.claimable) throw jobNotQueued(jobId, before.state, 'changing the priority');
    const [job] = await tx.update(jobs).set({ priority, updatedAt: sql`now()` }).where(eq(jobs.id, jobId)).returning();
    await writeAudit(tx, { actor, action: 'job.priority', target: `job:${jobId}`, before: { priority: before.priority }, after: { priority } });
    return job;
  });
}
