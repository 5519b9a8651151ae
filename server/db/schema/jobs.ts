import { sql } from 'drizzle-orm';
import { boolean, check, doublePrecision, index, integer, jsonb, pgEnum, pgTable, serial, text, timestamp } from 'drizzle-orm/pg-core';
import { JOB_KINDS, JOB_STATES } from '../../../shared/api/jobs.js';
import { arrays } from './arrays.js';
import { jobBatches } from './job-batches.js';
import { recordings } from './recordings.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/**
 * A PostgreSQL enum keeps the states' order (queued < scheduled < running < final states),
 * so SQL may compare them; the legal moves between them live in server/queue/transitions.ts.
 */
export const jobStateEnum = pgEnum('job_state', JOB_STATES);

/**
 * One queued unit of work. The queue owns status, progress and history here (not in the compute
 * child), so any node or browser can see them. The recording, training recording, array and
 * batch a job names are foreign keys that refuse deletion while the job exists (the services
 * say so in words first; the keys close the race between their check and the delete). The array
 * geometry used is frozen in `arraySnapshot`, so a later edit of the array never changes what an
 * old job meant.
 */
export const jobs = pgTable(
  'jobs',
  {
    id: serial().primaryKey(),
    name: text().notNull(),
    kind: text({ enum: JOB_KINDS }).notNull().default('beamform'),
    ownerId: integer()
      .notNull()
      .references(() => users.id),
    /** Validated job parameters (shared/params) and the version of their schema. */
    params: jsonb().notNull(),
    paramsVersion: integer().notNull(),
    recordingId: integer().references(() => recordings.id, { onDelete: 'restrict' }),
    trainingRecordingId: integer().references(() => recordings.id, { onDelete: 'restrict' }),
    arrayId: integer().references(() => arrays.id, { onDelete: 'restrict' }),
    arraySnapshot: jsonb(),
    state: jobStateEnum().notNull().default('queued'),
    /** Higher runs first; FIFO by (created_at, id) within one priority. */
    priority: integer().notNull().default(0),
    /** Not claimable before this instant (start-after, or a retry's back-off). */
    runAfter: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** Counted at claim, so a crash uses up an attempt too. */
    attempts: integer().notNull().default(0),
    maxAttempts: integer().notNull().default(3),
    /** Node id holding the lease while running; every write to a running job checks it. */
    claimedBy: text(),
    leaseExpiresAt: timestamp({ withTimezone: true }),
    cancelRequested: boolean().notNull().default(false),
    /** Windows [0, checkpointWindow) are flushed to the result files and survive a restart. */
    checkpointWindow: integer().notNull().default(0),
    totalWindows: integer(),
    windowsDone: integer().notNull().default(0),
    windowsPerSecond: doublePrecision(),
    etaSeconds: doublePrecision(),
    /** The reason of the last failure, written for a person. */
    lastError: text(),
    /** True when the job stopped early (cancelled while running) and kept its finished windows. */
    partial: boolean().notNull().default(false),
    rerunOf: integer(),
    /** The batch submission this job belongs to (job_batches.id), null for a single submission. */
    batchId: integer().references(() => jobBatches.id, { onDelete: 'restrict' }),
    startedAt: timestamp({ withTimezone: true }),
    finishedAt: timestamp({ withTimezone: true }),
    ...timestamps,
    /** Stored generated flag backing the claim index (now() is not allowed in a generated column). */
    claimable: boolean()
      .notNull()
      .generatedAlwaysAs(sql`state in ('queued', 'scheduled')`),
  },
  (t) => [
    index('jobs_claim_idx').on(t.priority.desc(), t.createdAt, t.id).where(sql`${t.claimable}`),
    index('jobs_lease_idx').on(t.leaseExpiresAt).where(sql`${t.state} = 'running'`),
    index('jobs_owner_idx').on(t.ownerId, t.createdAt),
    index('jobs_state_idx').on(t.state, t.createdAt),
    index('jobs_batch_idx').on(t.batchId).where(sql`${t.batchId} is not null`),
    check('jobs_attempts_ck', sql`${t.attempts} >= 0 and ${t.maxAttempts} >= 1`),
    check('jobs_running_has_lease_ck', sql`${t.state} <> 'running' or (${t.claimedBy} is not null and ${t.leaseExpiresAt} is not null)`),
  ],
);

export type JobRow = typeof jobs.$inferSelect;
export type NewJobRow = typeof jobs.$inferInsert;
