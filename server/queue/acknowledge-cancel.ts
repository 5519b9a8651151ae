import { and, eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { recordJobEvent } from './record-job-event.js';
import { movableTo } from './transitions.js';

/**
 * running -> cancelled once the compute child stopped between windows. The windows flushed
 * before the stop stay in the result files; `partial` marks the job so downloads say so.
 */
export async function acknowledgeCancel(db: AppDb, jobId: number, nodeId: string, windowsKept: number): Promise<JobRow | undefined> {
  return db.transaction(async (tx) => {
    const [job] = await tx
      .update(jobs)
      .set({
        state: 'cancelled',
        partial: windowsKept > 0,
        checkpointWindow: sql`greatest(${jobs.checkpointWindow}, ${windowsKept})`,
        windowsDone: sql`greatest(${jobs.checkpointWindow}, ${windowsKept})`,
        claimedBy: null,
        leaseExpiresAt: null,
        windowsPerSecond: null,
        etaSeconds: null,
        finishedAt: sql`now()`,
        updatedAt: sql`now()`,
      })
      .where(and(eq(jobs.id, jobId), eq(jobs.claimedBy, nodeId), movableTo('cancelled')))
      .returning();
    if (job) {
      await recordJobEvent(tx, {
        jobId,
        from: 'running',
        to: 'cancelled',
        actor: `node:${nodeId}`,
        message: windowsKept > 0 ? `stopped on request; windows 0..${windowsKept - 1} kept (partial)` : 'stopped on request before any window finished',
      });
    }
    return job;
  });
}
