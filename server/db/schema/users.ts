import { boolean, pgTable, serial, text, uniqueIndex } from 'drizzle-orm/pg-core';
import { ROLES } from '../../../shared/roles.js';
import { timestamps } from './timestamps.js';

export const users = pgTable(
  'users',
  {
    id: serial().primaryKey(),
    email: text().notNull(),
    displayName: text().notNull(),
    role: text({ enum: ROLES }).notNull(),
    /** scrypt hash in the form `scrypt$N$r$p$salt$hash` (base64); never the password. */
    passwordHash: text().notNull(),
    disabled: boolean().notNull().default(false),
    ...timestamps,
  },
  (t) => [uniqueIndex('users_email_lower_idx').on(t.email)],
);

export type UserRow = typeof users.$inferSelect;
export type NewUserRow = typeof users.$inferInsert;
