import type { ServerPlugin } from '../plugins.js';
import { queueDemoJob } from './demo-job.js';

/**
 * Whether this start queues the demo job: with demo data on, unless DEMO_JOB=off; test
 * servers (NODE_ENV=test) skip it unless DEMO_JOB=on, so other suites see an empty queue.
 */
export function demoJobWanted(demoData: boolean, nodeEnv: string, env: string | undefined = process.env['DEMO_JOB']): boolean {
  if (!demoData) return false;
  if (env === 'on' || env === 'off') return env === 'on';
  return nodeEnv !== 'test';
}

/**
 * Queues the finished-demo job in the background once the server is up (after the recordings
 * plugin started inspecting the demo files). List it after the queue and recordings plugins.
 */
export const demoJobPlugin: ServerPlugin = {
  name: 'demo-job',
  attach(ctx) {
    if (!demoJobWanted(ctx.config.demoData, ctx.config.nodeEnv)) return;
    void queueDemoJob(ctx).catch((e: unknown) => ctx.logger.warn(`demo job not queued: ${(e as Error).message}`));
  },
};
