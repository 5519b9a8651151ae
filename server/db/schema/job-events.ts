import { bigserial, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { jobStateEnum, jobs } from './jobs.js';

/**
 * A job's history: one row per state change (who or which node, why). Progress ticks are not
 * stored here (they overwrite the jobs row); this is the record a user reads afterwards.
 */
export const jobEvents = pgTable(
  'job_events',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    jobId: integer()
      .notNull()
      .references(() => jobs.id, { onDelete: 'cascade' }),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
    fromState: jobStateEnum(),
    toState: jobStateEnum().notNull(),
    /** Node id or 'user:<id>' that caused the change. */
    actor: text().notNull(),
    message: text(),
    data: jsonb(),
  },
  (t) => [index('job_events_job_idx').on(t.jobId, t.id)],
);

export type JobEventRow = typeof jobEvents.$inferSelect;
