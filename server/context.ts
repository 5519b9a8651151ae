import type { AppConfig } from './config.js';
import type { AppDb } from './db/client.js';
import type { Logger } from './logger.js';
import type { ComputePool } from './nodes/compute-pool.types.js';

/**
 * Long-lived services that features add at start-up (queue, live channel, mailer ...).
 * Add yours by declaration merging in your own file, then set it in a plugin's start():
 *
 *   declare module '../context.js' { interface AppServices { queue?: JobQueue } }
 */
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface AppServices {}

/** Everything a router or service needs, built once in main.ts and passed down explicitly. */
export interface AppContext {
  config: AppConfig;
  db: AppDb;
  dbKind: 'pglite' | 'postgres';
  logger: Logger;
  /** The session-cookie signing secret (from SESSION_SECRET or generated and stored on first start). */
  sessionSecret: string;
  /** The node's compute children; set by the compute plugin before the app is built. */
  compute?: ComputePool;
  services: AppServices;
  /** Process start, for GET /api/health uptime. */
  startedAt: number;
}
