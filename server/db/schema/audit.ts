import { bigserial, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/** Operations' actions (pause, resume, reprioritise, cancel, drain, ...): who, when, what, before, after. */
export const audit = pgTable(
  'audit',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** User id; null for the system (a node acting on its own). */
    userId: integer(),
    actor: text().notNull(),
    action: text().notNull(),
    /** What was acted on, e.g. 'job:42', 'queue', 'node:host-123'. */
    target: text().notNull(),
    before: jsonb(),
    after: jsonb(),
  },
  (t) => [index('audit_at_idx').on(t.at), index('audit_target_idx').on(t.target, t.at)],
);

export type AuditRow = typeof audit.$inferSelect;
