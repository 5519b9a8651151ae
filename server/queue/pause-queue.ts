import { sql } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { queueState } from '../db/schema/queue-state.js';
import { actorUserId, type Actor } from './actor.js';
import { writeAudit } from './write-audit.js';

/**
 * Pauses or resumes claiming for every node. Running jobs carry on; nothing new starts while
 * paused (e.g. before maintenance). Idempotent; audited with the previous state.
 */
export async function setQueuePaused(db: AppDb, paused: boolean, actor: Actor): Promise<void> {
  await db.transaction(async (tx) => {
    const [before] = await tx.select().from(queueState).for('update');
    await tx
      .insert(queueState)
      .values({ id: 1, paused, pausedBy: paused ? actorUserId(actor) : null, pausedAt: paused ? sql`now()` : null })
      .onConflictDoUpdate({
        target: queueState.id,
        set: { paused, pausedBy: paused ? actorUserId(actor) : null, pausedAt: paused ? sql`now()` : null },
      });
    await writeAudit(tx, {
      actor,
      action: paused ? 'queue.pause' : 'queue.resume',
      target: 'queue',
      before: { paused: before?.paused ?? false },
      after: { paused },
    });
  });
}
