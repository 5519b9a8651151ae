import { and, desc, isNull, or, sql } from 'drizzle-orm';
import type { WorkerNode } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import { nodes } from '../db/schema/nodes.js';

/**
 * Nodes heard from within the last day, newest heartbeat first. `alive` means a
 * heartbeat within `staleAfterMs` (the database clock decides, not this machine's).
 */
export async function listNodes(db: AppDb, staleAfterMs: number): Promise<WorkerNode[]> {
  const rows = await db
    .select({
      node: nodes,
      ageS: sql<number>`extract(epoch from (now() - ${nodes.heartbeatAt}))::float8`,
    })
    .from(nodes)
    .where(and(sql`${nodes.heartbeatAt} > now() - interval '1 day'`, or(isNull(nodes.stoppedAt), sql`${nodes.stoppedAt} > now() - interval '1 day'`)))
    .orderBy(desc(nodes.heartbeatAt));
  return rows.map(({ node, ageS }) => ({
    id: node.id,
    host: node.host,
    pid: node.pid,
    kind: node.kind,
    startedAt: node.startedAt.toISOString(),
    heartbeatAt: node.heartbeatAt.toISOString(),
    heartbeatAgeS: Math.max(0, Number(ageS)),
    alive: node.stoppedAt === null && Number(ageS) * 1000 < staleAfterMs,
    draining: node.draining,
    concurrency: node.concurrency,
    currentJobIds: node.currentJobIds,
    windowsPerSecond: node.windowsPerSecond,
  }));
}
