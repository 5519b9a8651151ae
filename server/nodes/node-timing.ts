import { z } from 'zod';
import type { BackoffPolicy } from '../queue/backoff.js';

/**
 * Queue timing knobs from the environment (both the server's node and headless nodes):
 * JOB_LEASE_SECONDS (default 30) is how long a silent node keeps its jobs before another node's
 * reaper takes them back; the lease is renewed every second while a job runs.
 * JOB_POLL_SECONDS (default 2) is how often an idle node looks for work submitted elsewhere.
 * JOB_RETRY_BASE_SECONDS (default 10) and JOB_RETRY_CAP_SECONDS (default 600) shape the retry
 * back-off after a transient failure (see server/queue/backoff.ts).
 * JOB_CHECKPOINT_SECONDS (default 1) is the longest a running job goes without fsyncing its
 * results and reporting a checkpoint; a crash loses at most this much work. The compute
 * children inherit the variable and read it themselves (worker/tasks/beamform.ts); it is
 * checked here so a bad value stops the node at start with this message.
 */
const timingSchema = z.object({
  JOB_LEASE_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(2, 'must be at least 2 seconds (the lease is renewed every second)').max(3600, 'must be at most 3600').default(30),
  JOB_POLL_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(0.1, 'must be at least 0.1').max(600, 'must be at most 600').default(2),
  JOB_RETRY_BASE_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(0.1, 'must be at least 0.1').max(3600, 'must be at most 3600').default(10),
  JOB_RETRY_CAP_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(0.1, 'must be at least 0.1').max(86_400, 'must be at most 86400 (a day)').default(600),
  JOB_CHECKPOINT_SECONDS: z.coerce.number({ error: 'must be a number of seconds' }).min(0.05, 'must be at least 0.05 (every fsync costs time)').max(60, 'must be at most 60').default(1),
});

export interface NodeTiming {
  leaseMs: number;
  pollMs: number;
  tickMs: number;
  reapMs: number;
  backoff: BackoffPolicy;
}

export function nodeTimingFromEnv(env: NodeJS.ProcessEnv = process.env): NodeTiming {
  const pick = (k: string) => env[k] || undefined;
  const r = timingSchema.safeParse({
    JOB_LEASE_SECONDS: pick('JOB_LEASE_SECONDS'),
    JOB_POLL_SECONDS: pick('JOB_POLL_SECONDS'),
    JOB_RETRY_BASE_SECONDS: pick('JOB_RETRY_BASE_SECONDS'),
    JOB_RETRY_CAP_SECONDS: pick('JOB_RETRY_CAP_SECONDS'),
    JOB_CHECKPOINT_SECONDS: pick('JOB_CHECKPOINT_SECONDS'),
  });
  if (!r.success) {
    throw new Error(`Fix these settings: ${r.error.issues.map((i) => `${String(i.path[0])}=${JSON.stringify(env[String(i.path[0])])}: ${i.message}`).join('; ')}`);
  }
  const leaseMs = r.data.JOB_LEASE_SECONDS * 1000;
  const baseMs = r.data.JOB_RETRY_BASE_SECONDS * 1000;
  return {
    leaseMs,
    pollMs: r.data.JOB_POLL_SECONDS * 1000,
    tickMs: Math.min(1000, leaseMs / 3),
    reapMs: Math.max(500, Math.min(10_000, leaseMs / 3)),
    backoff: { baseMs, capMs: Math.max(baseMs, r.data.JOB_RETRY_CAP_SECONDS * 1000) },
  };
}
