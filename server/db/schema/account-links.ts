import { integer, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './users.js';

export const ACCOUNT_LINK_PURPOSES = ['invite', 'password-reset'] as const;

/**
 * One-time links that let a person set their own password: an invitation to a new account or
 * a reset chosen by an admin. Stored as a SHA-256 digest; used once, then `usedAt` is set.
 */
export const accountLinks = pgTable(
  'account_links',
  {
    id: serial().primaryKey(),
    userId: integer()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    purpose: text({ enum: ACCOUNT_LINK_PURPOSES }).notNull(),
    secretSha256: text().notNull(),
    createdBy: integer(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    usedAt: timestamp({ withTimezone: true }),
  },
  (t) => [uniqueIndex('account_links_secret_idx').on(t.secretSha256)],
);

export type AccountLinkRow = typeof accountLinks.$inferSelect;
