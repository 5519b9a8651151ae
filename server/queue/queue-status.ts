import { sql } from 'drizzle-orm';
import { JOB_STATES, type JobState, type QueueStatus } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import { jobs } from '../db/schema/jobs.js';
import { queueState } from '../db/schema/queue-state.js';

/** Paused flag and job counts per state. */
export async function getQueueStatus(db: AppDb): Promise<QueueStatus> {
  const [state] = await db.select().from(queueState);
  const rows = await db.select({ state: jobs.state, n: sql<number>`count(*)::int` }).from(jobs).groupBy(jobs.state);
  const counts = Object.fromEntries(JOB_STATES.map((s) => [s, 0])) as Record<JobState, number>;
  for (const r of rows) counts[r.state] = Number(r.n);
  return {
    paused: state?.paused ?? false,
    pausedBy: state?.pausedBy ?? null,
    pausedAt: state?.pausedAt ? state.pausedAt.toISOString() : null,
    counts,
  };
}
