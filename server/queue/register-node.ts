import { sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { nodes, type NodeRow } from '../db/schema/nodes.js';

/** Announces a node at start (or after a restart with the same id): fresh heartbeat, not draining. */
export async function registerNode(
  db: AppDb,
  node: { id: string; host: string; pid: number; kind: 'server' | 'headless'; concurrency: number },
): Promise<NodeRow> {
  const [row] = await db
    .insert(nodes)
    .values({ ...node })
    .onConflictDoUpdate({
      target: nodes.id,
      set: {
        host: node.host,
        pid: node.pid,
        kind: node.kind,
        concurrency: node.concurrency,
        startedAt: sql`now()`,
        heartbeatAt: sql`now()`,
        draining: false,
        stoppedAt: null,
        currentJobIds: [],
        windowsPerSecond: 0,
      },
    })
    .returning();
  return row;
}
