import { integer, pgTable, serial, text, timestamp, boolean } from 'drizzle-orm/pg-core';
import { users } from './users.js';

/**
 * One batch submission: the same parameters over many recordings. Each recording still gets an
 * ordinary job (own results, checkpoint and CSVs) pointing back here through jobs.batch_id, so the
 * queue, retention and downloads need no batch-specific code.
 */
export const jobBatches = pgTable('job_batches', {
  id: serial().primaryKey(),
  name: text().notNull(),
  ownerId: integer()
    .notNull()
    .references(() => users.id),
  recordingCount: integer().notNull(),
  /** Set when the batch selected recordings by archive folder instead of by id. */
  archiveRootId: integer(),
  folder: text(),
  pattern: text(),
  recursive: boolean(),
  createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

export type JobBatchRow = typeof jobBatches.$inferSelect;
