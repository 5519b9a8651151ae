import { and, eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { recordJobEvent } from './record-job-event.js';
import { movableTo } from './transitions.js';

/**
 * running -> queued when this node stops (shutdown, redeploy) and interrupts the job through no
 * fault of the job: the attempt is refunded and the checkpoint kept, so the next node resumes.
 */
export async function releaseJob(db: AppDb, jobId: number, nodeId: string, reason: string): Promise<JobRow | undefined> {
  return db.transaction(async (tx) => {
    const [job] = await tx
      .update(jobs)
      .set({
        state: 'queued',
        attempts: sql`greatest(${jobs.attempts} - 1, 0)`,
        claimedBy: null,
        leaseExpiresAt: null,
        windowsPerSecond: null,
        etaSeconds: null,
        updatedAt: sql`now()`,
      })
      .where(and(eq(jobs.id, jobId), eq(jobs.claimedBy, nodeId), movableTo('queued')))
      .returning();
    if (job) await recordJobEvent(tx, { jobId, from: 'running', to: 'queued', actor: `node:${nodeId}`, message: reason });
    return job;
  });
}
