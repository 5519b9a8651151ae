import { eq, sql } from 'drizzle-orm';
import type { Request, Router } from 'express';
import { z } from 'zod';
import { submitBatchSchema, type CancelBatchResponse, type JobBatchDto } from '../../shared/api/job-batches.js';
import { isFinalJobState, type JobState } from '../../shared/api/jobs.js';
import { roleAtLeast } from '../../shared/roles.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { jobBatches, type JobBatchRow } from '../db/schema/job-batches.js';
import { jobs } from '../db/schema/jobs.js';
import { forbidden, HttpError, notFound } from '../http/http-error.js';
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
 * /batches/:id sums their states, POST /batches/:id/cancel cancels the ones not yet ended.
 * Mounted before /:id so "batch" is never read as a job id.
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
  router.post('/batches/:id/cancel', requireRole('analyst'), async (req, res) => {
    const id = batchIdSchema.parse(req.params.id);
    const [batch] = await ctx.db.select().from(jobBatches).where(eq(jobBatches.id, id));
    if (!batch) throw notFound(`Batch ${id} does not exist; open the jobs list to find it.`);
    if (batch.ownerId !== req.user!.id && !roleAtLeast(req.user!.role, 'operations')) {
      throw forbidden(`Batch ${id} belongs to someone else; only its owner or the operations role may cancel it.`);
    }
    const members = await ctx.db.select({ id: jobs.id, state: jobs.state }).from(jobs).where(eq(jobs.batchId, id)).orderBy(jobs.id);
    const answer: CancelBatchResponse = { batchId: id, cancelled: 0, stopping: 0, alreadyEnded: 0, message: '' };
    for (const m of members) {
      if (isFinalJobState(m.state)) {
        answer.alreadyEnded++;
        continue;
      }
      try {
        // One job at a time through the ordinary cancel, so each is audited and announced live.
        const r = await deps.queue().cancel(m.id, deps.actor(req));
        if (r.immediate) answer.cancelled++;
        else answer.stopping++;
      } catch (e) {
        // It ended between the list and its cancel (a race with its node): leave it as it is.
        if (e instanceof HttpError && e.code === 'job_finished') answer.alreadyEnded++;
        else throw e;
      }
    }
    const parts = [
      answer.cancelled ? `${answer.cancelled} queued job${answer.cancelled === 1 ? '' : 's'} cancelled` : '',
      answer.stopping ? `${answer.stopping} running job${answer.stopping === 1 ? '' : 's'} stopping after the window in progress (finished windows are kept, marked partial)` : '',
      answer.alreadyEnded ? `${answer.alreadyEnded} had already ended and ${answer.alreadyEnded === 1 ? 'was' : 'were'} left as ${answer.alreadyEnded === 1 ? 'it was' : 'they were'}` : '',
    ].filter(Boolean);
    answer.message = answer.cancelled + answer.stopping === 0 ? `Nothing to cancel in batch ${id}: every one of its ${members.length} jobs has already ended.` : `Batch ${id}: ${parts.join('; ')}.`;
    res.json(answer);
  });
}
