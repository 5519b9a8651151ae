import { boolean, check, integer, pgTable, timestamp } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

/** The queue's switches: at most one row (id = 1), written by pause/resume; no row means running. */
export const queueState = pgTable(
  'queue_state',
  {
    id: integer().primaryKey().default(1),
    paused: boolean().notNull().default(false),
    pausedBy: integer(),
    pausedAt: timestamp({ withTimezone: true }),
  },
  (t) => [check('queue_state_single_row_ck', sql`${t.id} = 1`)],
);
