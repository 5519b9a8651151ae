import { sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { recordJobEvent } from './record-job-event.js';
import { movableTo } from './transitions.js';

/**
 * Claims the next job for `nodeId` in one statement, or returns undefined.
 *
 * Picks the highest priority, then the oldest (created_at, id), among claimable jobs that are
 * due (run_after <= now()), not being cancelled, while the queue is not paused and this node
 * is not draining. `FOR UPDATE SKIP LOCKED` lets many nodes claim at once without blocking or
 * double-claiming. The attempt is counted here, so a crash mid-job uses one up (and an
 * endlessly crashing job stops at max_attempts). The lease starts now and must be renewed.
 */
export async function claimJob(db: AppDb, nodeId: string, leaseMs: number): Promise<JobRow | undefined> {
  return db.transaction(async (tx) => {
    const next = sql`(
      select ${jobs.id} from ${jobs}
      where ${jobs.claimable} and ${movableTo('running')}
        and ${jobs.runAfter} <= now()
        and not ${jobs.cancelRequested}
        and not exists (select 1 from queue_state where paused)
        and not exists (select 1 from nodes where nodes.id = ${nodeId} and nodes.draining)
      order by ${jobs.priority} desc, ${jobs.createdAt}, ${jobs.id}
      limit 1
      for update skip locked
    )`;
    const [job] = await tx
      .update(jobs)
      .set({
        state: 'running',
        attempts: sql`${jobs.attempts} + 1`,
        claimedBy: nodeId,
        leaseExpiresAt: sql`now() + ${leaseMs} * interval '1 millisecond'`,
        startedAt: sql`coalesce(${jobs.startedAt}, now())`,
        windowsPerSecond: null,
        etaSeconds: null,
        updatedAt: sql`now()`,
      })
      .where(sql`${jobs.id} = ${next}`)
      .returning();
    if (!job) return undefined;
    await recordJobEvent(tx, {
      jobId: job.id,
      from: null,
      to: 'running',
      actor: `node:${nodeId}`,
      message: `attempt ${job.attempts} of ${job.maxAttempts}` + (job.checkpointWindow > 0 ? `, resuming at window ${job.checkpointWindow}` : ''),
    });
    return job;
  });
}
