import { eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { nodes } from '../db/schema/nodes.js';

/**
 * Stamps the node's heartbeat with what it is doing. Returns the node's drain flag (set by
 * operations through any server), or undefined when the row vanished (then re-register).
 */
export async function nodeHeartbeat(
  db: AppDb,
  nodeId: string,
  status: { currentJobIds: number[]; windowsPerSecond: number; concurrency?: number },
): Promise<{ draining: boolean; heartbeatAt: Date } | undefined> {
  const [row] = await db
    .update(nodes)
    .set({
      heartbeatAt: sql`now()`,
      currentJobIds: status.currentJobIds,
      windowsPerSecond: status.windowsPerSecond,
      ...(status.concurrency !== undefined ? { concurrency: status.concurrency } : {}),
    })
    .where(eq(nodes.id, nodeId))
    .returning({ draining: nodes.draining, heartbeatAt: nodes.heartbeatAt });
  return row;
}
