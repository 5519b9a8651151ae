import { eq } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { nodes, type NodeRow } from '../db/schema/nodes.js';
import { HttpError } from '../http/http-error.js';
import type { Actor } from './actor.js';
import { writeAudit } from './write-audit.js';

/**
 * Drains (or un-drains) a node: it claims nothing new and finishes the jobs it holds, e.g.
 * before taking its machine down. Audited.
 */
export async function setNodeDraining(db: AppDb, nodeId: string, draining: boolean, actor: Actor): Promise<NodeRow> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(nodes).where(eq(nodes.id, nodeId)).for('update');
    if (!before) {
      throw new HttpError(404, 'node_not_found', `No node "${nodeId}" is registered; GET /api/workers lists the nodes and their ids.`);
    }
    const [row] = await tx.update(nodes).set({ draining }).where(eq(nodes.id, nodeId)).returning();
    await writeAudit(tx, {
      actor,
      action: draining ? 'node.drain' : 'node.undrain',
      target: `node:${nodeId}`,
      before: { draining: before.draining },
      after: { draining },
    });
    return row;
  });
}
