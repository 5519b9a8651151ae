import { sql, type SQL } from 'drizzle-orm';

/**
 * Retry delay for transient failures: exponential, capped, with "equal jitter" (half fixed,
 * half random) so retries of jobs that failed together spread out but never collapse to zero.
 * After attempt n (counted at claim, n >= 1) the job waits d/2 + random·d/2 with
 * d = min(cap, base·2^(n-1)). The cap stops delays from running away (hours) after many attempts.
 */
export interface BackoffPolicy {
  baseMs: number;
  capMs: number;
}

export const DEFAULT_BACKOFF: BackoffPolicy = { baseMs: 10_000, capMs: 10 * 60_000 };

/** The un-jittered delay after `attempt` attempts. */
export function backoffCeilingMs(attempt: number, policy: BackoffPolicy): number {
  const exp = Math.min(Math.max(attempt, 1) - 1, 30);
  return Math.min(policy.capMs, policy.baseMs * 2 ** exp);
}

/** [min, max] of the jittered delay, for documentation and tests. */
export function backoffRangeMs(attempt: number, policy: BackoffPolicy): [number, number] {
  const d = backoffCeilingMs(attempt, policy);
  return [d / 2, d];
}

/**
 * The same delay as an SQL interval expression over the row's attempts column, so the reaper
 * can requeue many jobs in one statement, each with its own delay.
 */
export function backoffIntervalSql(attempts: SQL, policy: BackoffPolicy): SQL {
  const ceiling = sql`least(${policy.capMs}::float8, ${policy.baseMs}::float8 * power(2, least(greatest(${attempts}, 1) - 1, 30)))`;
  return sql`(${ceiling} * (0.5 + random() * 0.5)) * interval '1 millisecond'`;
}
