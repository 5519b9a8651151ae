import { jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/** Key-value settings that survive restarts (the generated session secret, admin settings). */
export const settings = pgTable('settings', {
  key: text().primaryKey(),
  value: jsonb().notNull(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});
