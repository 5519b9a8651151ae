import { sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobBatches, type JobBatchRow } from '../db/schema/job-batches.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { actorLabel, type Actor } from './actor.js';
import type { EnqueueInput } from './enqueue-job.js';
import { recordJobEvent } from './record-job-event.js';
import { writeAudit } from './write-audit.js';

export interface BatchHeader {
  name: string;
  ownerId: number;
  archive?: { rootId: number; folder: string; pattern: string; recursive: boolean };
}

/**
 * Inserts the batch row, one ordinary job per recording (same rules as enqueueJob: 'scheduled'
 * while start-after lies ahead by the database clock, else 'queued'), their first history lines
 * and one audit entry, all in one transaction: a failure leaves nothing half-submitted.
 */
export async function enqueueBatch(db: AppDb, header: BatchHeader, inputs: EnqueueInput[], actor: Actor): Promise<{ batch: JobBatchRow; jobs: JobRow[] }> {
  return db.transaction(async (tx) => {
    const [batch] = await tx
      .insert(jobBatches)
      .values({
        name: header.name,
        ownerId: header.ownerId,
        recordingCount: inputs.length,
        archiveRootId: header.archive?.rootId ?? null,
        folder: header.archive?.folder ?? null,
        pattern: header.archive?.pattern ?? null,
        recursive: header.archive?.recursive ?? null,
      })
      .returning();
    const created: JobRow[] = [];
    for (const input of inputs) {
      const at = input.runAfter ? sql`${input.runAfter.toISOString()}::timestamptz` : undefined;
      const [job] = await tx
        .insert(jobs)
        .values({
          ...input,
          batchId: batch.id,
          runAfter: at ?? sql`now()`,
          state: at ? sql`case when ${at} > now() then 'scheduled'::job_state else 'queued'::job_state end` : 'queued',
        })
        .returning();
      await recordJobEvent(tx, { jobId: job.id, from: null, to: job.state, actor: actorLabel(actor), message: `submitted in batch ${batch.id}` });
      created.push(job);
    }
    await writeAudit(tx, {
      actor,
      action: 'job.batch-submit',
      target: `batch:${batch.id}`,
      after: { name: batch.name, jobIds: created.map((j) => j.id), recordingIds: created.map((j) => j.recordingId), archive: header.archive ?? null },
    });
    return { batch, jobs: created };
  });
}
