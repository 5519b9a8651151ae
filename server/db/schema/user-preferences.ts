import { boolean, integer, pgTable, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users.js';

/** Per-person choices from the Profile page (a row appears on the first change). */
export const userPreferences = pgTable('user_preferences', {
  userId: integer()
    .primaryKey()
    .references(() => users.id, { onDelete: 'cascade' }),
  /** A morning e-mail listing the jobs that ended overnight. */
  dailyDigest: boolean().notNull().default(false),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});
