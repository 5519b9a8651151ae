import { and, eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs } from '../db/schema/jobs.js';

export interface JobProgressUpdate {
  windowsDone?: number;
  totalWindows?: number;
  /** Only raise after the compute child reported the window's data flushed to disk. */
  checkpointWindow?: number;
  windowsPerSecond?: number | null;
  etaSeconds?: number | null;
}

/**
 * Extends this node's lease on a running job and, in the same write, stores progress.
 * Guarded by `claimed_by = me`: returns undefined when the lease was lost (reaped after a
 * stall, or the job was finished elsewhere), which tells the node to stop the child.
 * Returns the cancel flag so a cancel requested through any server reaches the running job.
 */
export async function renewLease(
  db: AppDb,
  jobId: number,
  nodeId: string,
  leaseMs: number,
  progress: JobProgressUpdate = {},
): Promise<{ cancelRequested: boolean } | undefined> {
  const [row] = await db
    .update(jobs)
    .set({
      leaseExpiresAt: sql`now() + ${leaseMs} * interval '1 millisecond'`,
      ...(progress.windowsDone !== undefined ? { windowsDone: progress.windowsDone } : {}),
      ...(progress.totalWindows !== undefined ? { totalWindows: progress.totalWindows } : {}),
      // never move a checkpoint backwards (a late message must not undo a newer one)
      ...(progress.checkpointWindow !== undefined
        ? { checkpointWindow: sql`greatest(${jobs.checkpointWindow}, ${progress.checkpointWindow})` }
        : {}),
      ...(progress.windowsPerSecond !== undefined ? { windowsPerSecond: progress.windowsPerSecond } : {}),
      ...(progress.etaSeconds !== undefined ? { etaSeconds: progress.etaSeconds } : {}),
      updatedAt: sql`now()`,
    })
    .where(and(eq(jobs.id, jobId), eq(jobs.claimedBy, nodeId), eq(jobs.state, 'running')))
    .returning({ cancelRequested: jobs.cancelRequested });
  return row;
}
