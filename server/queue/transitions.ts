import { sql, type SQL } from 'drizzle-orm';
import { JOB_STATES, type JobState } from '../../shared/api/jobs.js';
import { jobs } from '../db/schema/jobs.js';

/**
 * The one table of legal state moves. Every SQL operation guards its UPDATE with
 * `movableTo(target)`, so the database refuses exactly what this table refuses, and a race
 * (say a cancel against a claim) ends with one winner and one clear "no longer ..." message.
 *
 *  queued    -> running (claim), scheduled (start-after moved later), cancelled
 *  scheduled -> running (claim when due), queued (start now), cancelled
 *  running   -> succeeded, failed (permanent error or attempts used up), cancelled (cancel
 *               honoured between windows), scheduled (retry after back-off), queued (released
 *               by a stopping node, attempt refunded)
 *  succeeded, failed, cancelled: final (a rerun is a new job).
 */
export const TRANSITIONS: Readonly<Record<JobState, readonly JobState[]>> = {
  queued: ['running', 'scheduled', 'cancelled'],
  scheduled: ['running', 'queued', 'cancelled'],
  running: ['succeeded', 'failed', 'cancelled', 'scheduled', 'queued'],
  succeeded: [],
  failed: [],
  cancelled: [],
};

export function canMove(from: JobState, to: JobState): boolean {
  return TRANSITIONS[from].includes(to);
}

/** States from which a job may move to `to`, in state order. */
export function statesMovableTo(to: JobState): JobState[] {
  return JOB_STATES.filter((from) => canMove(from, to));
}

/** SQL guard: the job's current state may move to `to`. */
export function movableTo(to: JobState): SQL {
  const from = statesMovableTo(to);
  return sql`${jobs.state} in (${sql.join(
    from.map((s) => sql`${s}`),
    sql`, `,
  )})`;
}

export class IllegalTransitionError extends Error {
  constructor(
    readonly from: JobState,
    readonly to: JobState,
  ) {
    super(`A ${from} job cannot become ${to}.`);
    this.name = 'IllegalTransitionError';
  }
}

/** Throws IllegalTransitionError unless `from -> to` is in the table. */
export function assertTransition(from: JobState, to: JobState): void {
  if (!canMove(from, to)) throw new IllegalTransitionError(from, to);
}
