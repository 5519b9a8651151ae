import { integer, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * Failed sign-in counts per account and per client address (server/auth/login-throttle.ts),
 * in the database so every server of a deployment shares one count and a restart forgets none.
 * `key` is "account:<e-mail>" or "address:<ip>".
 */
export const loginFailures = pgTable('login_failures', {
  key: text().primaryKey(),
  failures: integer().notNull(),
  windowStart: timestamp({ withTimezone: true }).notNull(),
  lockedUntil: timestamp({ withTimezone: true }),
});
