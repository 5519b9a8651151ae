import { bigserial, index, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * The live channel's change log: one short row per change of a job, a node or the queue
 * switches, written by database triggers (drizzle/0005_live_change_triggers.sql), so a change
 * made by any process — this server, another server, a headless node on the same PostgreSQL —
 * reaches every server's WebSocket fan-out. Rows carry only what changed (topic and key);
 * the fan-out reads the current row, so a burst of progress ticks costs one read. Pruned after
 * a few minutes by server/live/live-hub.ts.
 */
export const liveChanges = pgTable(
  'live_changes',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    /** 'job' | 'node' | 'queue'. */
    topic: text().notNull(),
    /** Job id or node id as text; '1' for the queue switches. */
    ref: text().notNull(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('live_changes_at_idx').on(t.at)],
);

export type LiveChangeRow = typeof liveChanges.$inferSelect;
