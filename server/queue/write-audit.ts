import type { AppDb } from '../db/client.js';
import { audit } from '../db/schema/audit.js';
import { actorLabel, actorUserId, type Actor } from './actor.js';

/** Executor: the database or an open transaction (both have insert). */
export type DbOrTx = Pick<AppDb, 'insert' | 'update' | 'select' | 'execute'>;

/** Records one operations action (who, when, what, before, after). */
export async function writeAudit(
  db: DbOrTx,
  entry: { actor: Actor; action: string; target: string; before?: unknown; after?: unknown },
): Promise<void> {
  await db.insert(audit).values({
    userId: actorUserId(entry.actor),
    actor: actorLabel(entry.actor),
    action: entry.action,
    target: entry.target,
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}
