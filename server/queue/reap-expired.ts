import { sql } from 'drizzle-orm';
import type { JobState } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import { backoffIntervalSql, type BackoffPolicy } from './backoff.js';
import { recordJobEvent } from './record-job-event.js';

export interface ReapedJob {
  id: number;
  state: JobState;
  lostNode: string;
}

/**
 * Returns running jobs whose lease expired (their node was killed, lost its database, or hung)
 * to the queue through the normal retry path: scheduled after back-off while attempts remain,
 * otherwise failed; a job whose cancel was requested becomes cancelled (partial when some
 * windows were kept). Any node may reap; SKIP LOCKED keeps two reapers from fighting.
 */
export async function reapExpired(db: AppDb, reaperNodeId: string, policy: BackoffPolicy): Promise<ReapedJob[]> {
  return db.transaction(async (tx) => {
    const result = await tx.execute(sql`
      with expired as (
        select id, claimed_by from jobs
        where state = 'running' and lease_expires_at < now()
        for update skip locked
      )
      update jobs j set
        state = case
          when j.cancel_requested then 'cancelled'::job_state
          when j.attempts >= j.max_attempts then 'failed'::job_state
          else 'scheduled'::job_state end,
        run_after = case
          when j.cancel_requested or j.attempts >= j.max_attempts then j.run_after
          else now() + ${backoffIntervalSql(sql`j.attempts`, policy)} end,
        partial = j.cancel_requested and j.checkpoint_window > 0,
        finished_at = case when j.cancel_requested or j.attempts >= j.max_attempts then now() else null end,
        last_error = case when j.cancel_requested then j.last_error else
          'Node ' || e.claimed_by || ' stopped renewing its lease (it crashed, hung or lost the database) during attempt '
          || j.attempts || ' of ' || j.max_attempts || '.' end,
        claimed_by = null,
        lease_expires_at = null,
        windows_per_second = null,
        eta_seconds = null,
        updated_at = now()
      from expired e
      where j.id = e.id
      returning j.id, j.state, e.claimed_by as lost_node`);
    const reaped = (result as unknown as { rows: { id: number; state: JobState; lost_node: string }[] }).rows.map((r) => ({
      id: Number(r.id),
      state: r.state,
      lostNode: r.lost_node,
    }));
    for (const r of reaped) {
      await recordJobEvent(tx, {
        jobId: r.id,
        from: 'running',
        to: r.state,
        actor: `node:${reaperNodeId}`,
        message: `lease of node ${r.lostNode} expired`,
      });
    }
    return reaped;
  });
}
