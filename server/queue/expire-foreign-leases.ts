import { and, eq, ne, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { jobs } from '../db/schema/jobs.js';

/**
 * Embedded database only: the process that opens PGlite is the only node there can be, so a
 * job still 'running' under another node id was left by a previous process that crashed.
 * Expiring those leases now lets the reaper return the jobs at once instead of after a full
 * lease. Never call this on a shared PostgreSQL, where other nodes are alive.
 */
export async function expireForeignLeases(db: AppDb, ownNodeId: string): Promise<number> {
  const rows = await db
    .update(jobs)
    .set({ leaseExpiresAt: sql`now() - interval '1 millisecond'` })
    .where(and(eq(jobs.state, 'running'), ne(jobs.claimedBy, ownNodeId)))
    .returning({ id: jobs.id });
  return rows.length;
}
