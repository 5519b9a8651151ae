/**
 * `npm run worker`: a headless node (no HTTP) for scale-out. It connects to the shared
 * PostgreSQL (DATABASE_URL), claims jobs, and runs them in its own compute children, exactly
 * like the server's node. Result files go to RESULTS_DIR, which must be the same shared path
 * for every node and the server. PGlite is refused: one process owns an embedded database.
 *
 * SIGTERM/SIGINT: stop claiming, stop running jobs between windows, hand them back to the
 * queue with their checkpoints, exit 0. A second signal exits at once (leases then expire).
 */
import { loadConfig, ConfigError } from '../server/config.js';
import { openDatabase } from '../server/db/client.js';
import { resolveBeamformPayload } from '../server/nodes/beamform-payload.js';
import { ForkedComputePool } from '../server/nodes/compute-pool.js';
import { JobNode } from '../server/nodes/job-node.js';
import { nodeTimingFromEnv } from '../server/nodes/node-timing.js';
import { createQueueEvents } from '../server/nodes/queue-events.js';

function fail(message: string): never {
  console.error(message);
  process.exit(1);
}

let config;
let timing;
try {
  config = loadConfig();
  timing = nodeTimingFromEnv();
} catch (e) {
  fail(e instanceof ConfigError ? e.message : `Nullsmith worker cannot start: ${(e as Error).message}`);
}
if (!config.databaseUrl) {
  fail(
    'Nullsmith worker needs DATABASE_URL=postgres://... : a headless node shares the queue through a PostgreSQL server. ' +
      'The embedded database (PGlite) belongs to the server process alone; with it, the server runs jobs itself (raise WORKER_CONCURRENCY instead).',
  );
}
if (!process.env.RESULTS_DIR) {
  console.error(`note: RESULTS_DIR is not set; results go to ${config.resultsDir}, which the server must see at the same path.`);
}

const log = (level: 'info' | 'warn' | 'error', message: string) =>
  console[level === 'info' ? 'log' : level](JSON.stringify({ level, message, at: new Date().toISOString() }));

const database = await openDatabase({ dataDir: config.dataDir, databaseUrl: config.databaseUrl }).catch((e: Error) =>
  fail(`Nullsmith worker cannot reach the database at DATABASE_URL: ${e.message}. Check the URL and that PostgreSQL is running.`),
);
const pool = new ForkedComputePool({ concurrency: config.workerConcurrency, log });
const node = new JobNode({
  db: database.db,
  pool,
  events: createQueueEvents(),
  kind: 'headless',
  concurrency: config.workerConcurrency,
  payloads: { beamform: resolveBeamformPayload },
  resultsDir: config.resultsDir,
  ...timing,
  log,
});
await node.start();
console.log(`Nullsmith worker ${node.id} ready: ${config.workerConcurrency} compute slot(s), results in ${config.resultsDir}`);

let stopping = false;
const shutdown = async (signal: string) => {
  if (stopping) {
    log('warn', `second ${signal}: exiting now; running jobs return to the queue when their leases expire`);
    process.exit(1);
  }
  stopping = true;
  log('info', `${signal}: handing running jobs back to the queue`);
  await node.stop();
  await pool.close();
  await database.close();
  process.exit(0);
};
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
