import { eq, sql } from 'drizzle-orm';
import type { Request, Router } from 'express';
import { z } from 'zod';
import { submitBatchSchema, type JobBatchDto } from '../../shared/api/job-batches.js';
import type { JobState } from '../../shared/api/jobs.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { jobBatches, type JobBatchRow } from '../db/schema/job-batches.js';
import { jobs } from '../db/schema/jobs.js';
import { notFound } from '../http/http-error.js';
import { prepareBeamformBatch } from '../nodes/job-batch-submission.js';
import type { JobQueue } from '../nodes/job-queue.js';
import type { Actor } from '../queue/actor.js';
import { enqueueBatch } from '../queue/enqueue-batch.js';
import { toJobDto } from '../queue/job-dto.js';

const batchIdSchema = z.coerce.number({ error: 'The batch id must be a whole number.' }).int('The batch id must be a whole number.').positive('The batch id must be a positive number.');

const toBatchDto = (b: JobBatchRow): JobBatchDto => ({
  id: b.id,
  name: b.name,
  ownerId: b.ownerId,
  recordingCount: b.recordingCount,
  archiveRootId: b.archiveRootId,
  folder: b.folder,
  pattern: b.pattern,
  recursive: b.recursive,
  createdAt: b.createdAt.toISOString(),
});

/**
 * Batch submission on /api/jobs: POST /batch queues one ordinary job per recording, GET
 * /batches/:id sums their states. Mounted before /:id so "batch" is never read as a job id.
 */
export function mountJobBatchRoutes(router: Router, ctx: AppContext, deps: { queue: () => JobQueue; actor: (req: Request) => Actor }): void {
  router.post('/batch', requireRole('analyst'), async (req, res) => {
    const body = submitBatchSchema.parse(req.body);
    const queue = deps.queue();
    const { inputs, estimates } = await prepareBeamformBatch(ctx.db, body, req.user!.id);
    const { batch, jobs: created } = await enqueueBatch(
      ctx.db,
      { name: body.name, ownerId: req.user!.id, ...(body.archive ? { archive: body.archive } : {}) },
      inputs,
      deps.actor(req),
    );
    for (const job of created) queue.emitState(job, null);
    if (created.length) queue.events.emit('job:submitted', { jobId: created[0].id });
    res.status(201).json({ batch: toBatchDto(batch), jobs: created.map(toJobDto), estimates });
  });

  router.get('/batches/:id', async (req, res) => {
    const id = batchIdSchema.parse(req.params.id);
    const [batch] = await ctx.db.select().from(jobBatches).where(eq(jobBatches.id, id));
    if (!batch) throw notFound(`Batch ${id} does not exist; open the jobs list to find it.`);
    const rows = await ctx.db
      .select({ state: jobs.state, n: sql<number>`count(*)::int`, done: sql<number>`coalesce(sum(${jobs.windowsDone}), 0)::int`, total: sql<number>`coalesce(sum(${jobs.totalWindows}), 0)::int` })
      .from(jobs)
      .where(eq(jobs.batchId, id))
      .groupBy(jobs.state);
    const counts: Partial<Record<JobState, number>> = {};
    let windowsDone = 0;
    let totalWindows = 0;
    for (const r of rows) {
      counts[r.state] = Number(r.n);
      windowsDone += Number(r.done);
      totalWindows += Number(r.total);
    }
    res.json({ batch: { ...toBatchDto(batch), counts, windowsDone, totalWindows } });
  });
}
