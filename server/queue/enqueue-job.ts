import { sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow, type NewJobRow } from '../db/schema/jobs.js';
import { actorLabel, type Actor } from './actor.js';
import { recordJobEvent } from './record-job-event.js';

export type EnqueueInput = Omit<NewJobRow, 'id' | 'state' | 'attempts' | 'claimedBy' | 'leaseExpiresAt' | 'claimable' | 'createdAt' | 'updatedAt' | 'runAfter'> & {
  runAfter?: Date;
};

/**
 * Inserts a job: 'scheduled' when its start-after lies in the future, else 'queued'.
 * The database clock decides, so nodes on other machines agree.
 */
export async function enqueueJob(db: AppDb, input: EnqueueInput, actor: Actor): Promise<JobRow> {
  return db.transaction(async (tx) => {
    const at = input.runAfter ? sql`${input.runAfter.toISOString()}::timestamptz` : undefined;
    const [job] = await tx
      .insert(jobs)
      .values({
        ...input,
        runAfter: at ?? sql`now()`,
        state: at ? sql`case when ${at} > now() then 'scheduled'::job_state else 'queued'::job_state end` : 'queued',
      })
      .returning();
    await recordJobEvent(tx, { jobId: job.id, from: null, to: job.state, actor: actorLabel(actor), message: 'submitted' });
    return job;
  });
}
