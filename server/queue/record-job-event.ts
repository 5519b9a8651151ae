import type { JobState } from '../../shared/api/jobs.js';
import { jobEvents } from '../db/schema/job-events.js';
import type { DbOrTx } from './write-audit.js';

/** Appends one line to a job's history. */
export async function recordJobEvent(
  db: DbOrTx,
  e: { jobId: number; from: JobState | null; to: JobState; actor: string; message?: string; data?: unknown },
): Promise<void> {
  await db.insert(jobEvents).values({
    jobId: e.jobId,
    fromState: e.from,
    toState: e.to,
    actor: e.actor,
    message: e.message ?? null,
    data: e.data ?? null,
  });
}
