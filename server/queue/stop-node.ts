import { eq, sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { nodes } from '../db/schema/nodes.js';

/** Marks a node stopped at a clean shutdown, so the workers list does not show it as lost. */
export async function stopNode(db: AppDb, nodeId: string): Promise<void> {
  await db.update(nodes).set({ stoppedAt: sql`now()`, currentJobIds: [], windowsPerSecond: 0 }).where(eq(nodes.id, nodeId));
}
