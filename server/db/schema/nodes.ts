import { boolean, doublePrecision, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * Processes that claim and run jobs: the server in the embedded default, plus any headless
 * `npm run worker` nodes on PostgreSQL. A node whose heartbeat is old is dead; its jobs' leases
 * expire and another node's reaper returns them to the queue.
 */
export const nodes = pgTable(
  'nodes',
  {
    id: text().primaryKey(),
    host: text().notNull(),
    pid: integer().notNull(),
    kind: text({ enum: ['server', 'headless'] }).notNull(),
    concurrency: integer().notNull(),
    startedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    heartbeatAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** A draining node claims nothing new and finishes what it has. */
    draining: boolean().notNull().default(false),
    stoppedAt: timestamp({ withTimezone: true }),
    currentJobIds: jsonb().$type<number[]>().notNull().default([]),
    windowsPerSecond: doublePrecision().notNull().default(0),
  },
  (t) => [index('nodes_heartbeat_idx').on(t.heartbeatAt)],
);

export type NodeRow = typeof nodes.$inferSelect;
