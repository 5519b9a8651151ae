import { z } from 'zod';

/**
 * Queue timing knobs from the environment (both the server's node and headless nodes):
 * JOB_LEASE_SECONDS (default 30) is how long a silent node keeps its jobs before another node's
 * reaper takes them back; the lease is renewed every second while a job runs.
 * JOB_POLL_SECONDS (default 2) is how often an idle node looks for work submitted elsewhere.
 */
const timingSchema = z.object({
  JOB_LEASE_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(2, 'must be at least 2 seconds (the lease is renewed every second)').max(3600, 'must be at most 3600').default(30),
  JOB_POLL_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(0.1, 'must be at least 0.1').max(600, 'must be at most 600').default(2),
});

export interface NodeTiming {
  leaseMs: number;
  pollMs: number;
  tickMs: number;
  reapMs: number;
}

export function nodeTimingFromEnv(env: NodeJS.ProcessEnv = process.env): NodeTiming {
  const r = timingSchema.safeParse({ JOB_LEASE_SECONDS: env.JOB_LEASE_SECONDS || undefined, JOB_POLL_SECONDS: env.JOB_POLL_SECONDS || undefined });
  if (!r.success) {
    throw new Error(`Fix these settings: ${r.error.issues.map((i) => `${String(i.path[0])}=${JSON.stringify(env[String(i.path[0])])}: ${i.message}`).join('; ')}`);
  }
  const leaseMs = r.data.JOB_LEASE_SECONDS * 1000;
  return { leaseMs, pollMs: r.data.JOB_POLL_SECONDS * 1000, tickMs: Math.min(1000, leaseMs / 3), reapMs: Math.max(500, Math.min(10_000, leaseMs / 3)) };
}
