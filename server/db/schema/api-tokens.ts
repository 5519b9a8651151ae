import { index, integer, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { TOKEN_SCOPES } from '../../../shared/api/tokens.js';
import { users } from './users.js';

/**
 * Personal API tokens for scripts. Only a SHA-256 digest of the secret is stored (the secret
 * is 256 random bits, so a fast digest is enough: nothing to brute-force; common practice);
 * the clear secret is shown once at creation. `prefix` (the first characters) lets a person
 * tell tokens apart without revealing them.
 */
export const apiTokens = pgTable(
  'api_tokens',
  {
    id: serial().primaryKey(),
    userId: integer()
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    name: text().notNull(),
    prefix: text().notNull(),
    secretSha256: text().notNull(),
    scope: text({ enum: TOKEN_SCOPES }).notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    revokedAt: timestamp({ withTimezone: true }),
    lastUsedAt: timestamp({ withTimezone: true }),
  },
  (t) => [uniqueIndex('api_tokens_secret_idx').on(t.secretSha256), index('api_tokens_user_idx').on(t.userId)],
);

export type ApiTokenRow = typeof apiTokens.$inferSelect;
