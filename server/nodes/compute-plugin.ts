import type { ServerPlugin } from '../plugins.js';
import { ForkedComputePool } from './compute-pool.js';

/**
 * Gives the server its compute children (ctx.compute). One slot more than WORKER_CONCURRENCY:
 * jobs take at most WORKER_CONCURRENCY slots (the node's limit), so short tasks such as a new
 * recording's inspection never wait hours behind a long job.
 */
export const computePlugin: ServerPlugin = {
  name: 'compute',
  start(ctx) {
    ctx.compute = new ForkedComputePool({
      concurrency: ctx.config.workerConcurrency + 1,
      log: (level, message) => ctx.logger[level](message),
    });
  },
  async stop(ctx) {
    await ctx.compute?.close();
  },
};
