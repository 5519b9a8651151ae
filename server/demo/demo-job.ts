import { and, count, eq } from 'drizzle-orm';
import type { AppContext } from '../context.js';
import { jobs } from '../db/schema/jobs.js';
import { recordings } from '../db/schema/recordings.js';
import { settings } from '../db/schema/settings.js';
import { users } from '../db/schema/users.js';
import { prepareBeamformJob } from '../nodes/job-submission.js';
import { DEMO_JOB_NAME, demoJobParams } from './demo-job-params.js';

/** Settings key set once the demo job was queued, so deleting it never brings it back. */
const DEMO_JOB_KEY = 'demo_job_queued';
/** The demo recording the job beamforms (samples/demo). */
const DEMO_RECORDING = 'gannet-ledge-8ch.wav';

/**
 * Queues the demo job on a fresh installation: after the demo recordings are inspected, one
 * beamforming job on the demo WAV goes through the real queue and a compute child like any
 * other, so every page has real results to show a few seconds after the first start. Runs
 * once per database (a settings flag), only when no job exists yet. Returns the job id, or
 * null when there was nothing to do.
 */
export async function queueDemoJob(ctx: AppContext): Promise<number | null> {
  const { db } = ctx;
  const queue = ctx.services.queue;
  if (!queue) return null;
  const [flag] = await db.select().from(settings).where(eq(settings.key, DEMO_JOB_KEY));
  if (flag) return null;
  const [{ n }] = await db.select({ n: count() }).from(jobs);
  if (n > 0) return null;
  await ctx.services.recordingKit?.inspector.idle();
  const [rec] = await db
    .select()
    .from(recordings)
    .where(and(eq(recordings.source, 'demo'), eq(recordings.name, DEMO_RECORDING)));
  if (!rec || rec.state !== 'ready') {
    ctx.logger.warn(`demo job not queued: the demo recording ${DEMO_RECORDING} is ${rec ? rec.state : 'missing'}`);
    return null;
  }
  const [owner] = await db.select({ id: users.id }).from(users).where(eq(users.role, 'analyst')).limit(1);
  const [admin] = owner ? [owner] : await db.select({ id: users.id }).from(users).limit(1);
  if (!admin) return null;
  const { input } = await prepareBeamformJob(db, { name: DEMO_JOB_NAME, ownerId: admin.id, recordingId: rec.id, params: demoJobParams(), priority: 0, maxAttempts: 3 });
  const job = await queue.submit(input, { kind: 'node', nodeId: ctx.services.jobNode?.id ?? 'demo-data' });
  await db.insert(settings).values({ key: DEMO_JOB_KEY, value: { jobId: job.id } }).onConflictDoNothing();
  ctx.logger.info(`demo data: queued demo job ${job.id} (${DEMO_JOB_NAME})`);
  return job.id;
}
