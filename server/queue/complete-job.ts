import { and, eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { recordJobEvent } from './record-job-event.js';
import { movableTo } from './transitions.js';

/** running -> succeeded, only by the node holding the lease. Undefined when the lease was lost. */
export async function completeJob(db: AppDb, jobId: number, nodeId: string, totalWindows: number): Promise<JobRow | undefined> {
  return db.transaction(async (tx) => {
    const [job] = await tx
      .update(jobs)
      .set({
        state: 'succeeded',
        claimedBy: null,
        leaseExpiresAt: null,
        totalWindows,
        windowsDone: totalWindows,
        checkpointWindow: totalWindows,
        etaSeconds: 0,
        lastError: null,
        finishedAt: sql`now()`,
        updatedAt: sql`now()`,
      })
      .where(and(eq(jobs.id, jobId), eq(jobs.claimedBy, nodeId), movableTo('succeeded')))
      .returning();
    if (job) await recordJobEvent(tx, { jobId, from: 'running', to: 'succeeded', actor: `node:${nodeId}`, message: `${totalWindows} windows` });
    return job;
  });
}
