import { bigint, integer, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/** Jobs whose results the retention sweep must keep, whatever their age. */
export const jobPins = pgTable('job_pins', {
  jobId: integer().primaryKey(),
  pinnedBy: integer(),
  pinnedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  note: text().notNull().default(''),
});

/** Jobs whose result files were deleted, when, why and how much disk came back. */
export const resultPurges = pgTable('result_purges', {
  jobId: integer().primaryKey(),
  purgedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  bytesReclaimed: bigint({ mode: 'number' }).notNull(),
  /** 'scheduled' or 'on demand by user:N'. */
  reason: text().notNull(),
});
