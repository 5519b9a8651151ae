import fs from 'node:fs';
import type { ServerPlugin } from '../plugins.js';
import { resolveBeamformPayload } from './beamform-payload.js';
import { JobNode } from './job-node.js';
import { JobQueue } from './job-queue.js';
import { nodeTimingFromEnv } from './node-timing.js';
import { createQueueEvents, type QueueEvents } from './queue-events.js';
import { RemoteJobWatcher } from './remote-job-watcher.js';

declare module '../context.js' {
  interface AppServices {
    /** Typed queue events (job:state, job:progress, node:heartbeat, ...), for the live channel. */
    events?: QueueEvents;
    /** Queue operations for routes (submit, cancel, priority, pause, drain) with their events. */
    queue?: JobQueue;
    /** This server's own node (the only one in the embedded default). */
    jobNode?: JobNode;
    /** PostgreSQL mode: publishes jobs run by headless nodes as events here too. */
    remoteJobWatcher?: RemoteJobWatcher;
  }
}

/**
 * The queue inside the server: events, the operations service, and a node that runs jobs in
 * compute children. Needs the compute plugin before it (ctx.compute). Stopping releases
 * running jobs back to the queue with their checkpoints.
 */
export const queuePlugin: ServerPlugin = {
  name: 'queue',
  async start(ctx) {
    if (!ctx.compute) throw new Error('The queue plugin needs the compute plugin listed before it in server/plugins.ts.');
    fs.mkdirSync(ctx.config.resultsDir, { recursive: true });
    const events = createQueueEvents();
    ctx.services.events = events;
    ctx.services.queue = new JobQueue(ctx.db, events);
    const node = new JobNode({
      db: ctx.db,
      pool: ctx.compute,
      events,
      kind: 'server',
      soleNode: ctx.dbKind === 'pglite',
      concurrency: ctx.config.workerConcurrency,
      payloads: { beamform: resolveBeamformPayload },
      resultsDir: ctx.config.resultsDir,
      ...nodeTimingFromEnv(),
      log: (level, message) => ctx.logger[level](message),
    });
    await node.start();
    ctx.services.jobNode = node;
    if (ctx.dbKind === 'postgres') {
      ctx.services.remoteJobWatcher = new RemoteJobWatcher(ctx.db, events, node.id);
      ctx.services.remoteJobWatcher.start();
    }
  },
  async stop(ctx) {
    ctx.services.remoteJobWatcher?.stop();
    await ctx.services.jobNode?.stop();
  },
};
