import { index, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/** express-session store: one row per browser session, so sign-ins survive a restart. */
export const sessions = pgTable(
  'sessions',
  {
    sid: text().primaryKey(),
    data: jsonb().notNull(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
  },
  (t) => [index('sessions_expires_idx').on(t.expiresAt)],
);
