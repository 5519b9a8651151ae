import { Router, type Request } from 'express';
import { asc, eq } from 'drizzle-orm';
import { z } from 'zod';
import { jobPrioritySchema, listJobsQuerySchema, setPrioritySchema, submitJobSchema } from '../../shared/api/jobs.js';
import { roleAtLeast } from '../../shared/roles.js';
import { requireRole, requireUser } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { jobEvents } from '../db/schema/job-events.js';
import { forbidden, HttpError } from '../http/http-error.js';
import type { JobQueue } from '../nodes/job-queue.js';
import { prepareBeamformJob } from '../nodes/job-submission.js';
import type { Actor } from '../queue/actor.js';
import { getJob } from '../queue/get-job.js';
import { toJobDto } from '../queue/job-dto.js';
import { listJobs } from '../queue/list-jobs.js';
import { mountJobBatchRoutes } from './job-batches.routes.js';
import { resultCsvHandler } from './results.router.js';

export const actorOf = (req: Request): Actor => ({ kind: 'user', userId: req.user!.id, role: req.user!.role, email: req.user!.email });

export function queueService(ctx: AppContext): JobQueue {
  const q = ctx.services.queue;
  if (!q) throw new HttpError(503, 'queue_unavailable', 'The job queue is not running on this server; check the server log for a start-up error.');
  return q;
}

const jobIdSchema = z.coerce.number({ error: 'The job id must be a whole number.' }).int('The job id must be a whole number.').positive('The job id must be a positive number.');

const rerunSchema = z.object({
  name: z.string().trim().min(1).max(200).optional(),
  params: z.unknown().optional(),
  priority: jobPrioritySchema.optional(),
  runAfter: z.iso.datetime({ offset: true, error: 'runAfter must be an ISO date-time, e.g. 2026-12-03T01:00:00Z.' }).optional(),
  arrayId: z.number().int().optional(),
});

/**
 * /api/jobs: submit, list, inspect, cancel, reprioritise, rerun, and download results.
 * Analysts submit and cancel their own jobs; operations may cancel any job and change priorities.
 */
export function jobsRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireUser);

  router.post('/', requireRole('analyst'), async (req, res) => {
    const body = submitJobSchema.parse(req.body);
    const { input, estimates } = await prepareBeamformJob(ctx.db, { ...body, ownerId: req.user!.id });
    const job = await queueService(ctx).submit(input, actorOf(req));
    res.status(201).json({ job: toJobDto(job), estimates });
  });

  // Before '/:id' so "batch"/"batches" are not read as job ids.
  mountJobBatchRoutes(router, ctx, { queue: () => queueService(ctx), actor: actorOf });

  router.get('/', async (req, res) => {
    const q = listJobsQuerySchema.parse(req.query);
    const { items, total } = await listJobs(ctx.db, q, req.user!.id);
    res.json({ items: items.map(toJobDto), total, limit: q.limit, offset: q.offset });
  });

  router.get('/:id', async (req, res) => {
    const job = await getJob(ctx.db, jobIdSchema.parse(req.params.id));
    const history = await ctx.db.select().from(jobEvents).where(eq(jobEvents.jobId, job.id)).orderBy(asc(jobEvents.id));
    res.json({
      job: toJobDto(job),
      events: history.map((e) => ({ at: e.at.toISOString(), from: e.fromState, to: e.toState, actor: e.actor, message: e.message })),
    });
  });

  router.post('/:id/cancel', requireRole('analyst'), async (req, res) => {
    const id = jobIdSchema.parse(req.params.id);
    const job = await getJob(ctx.db, id);
    if (job.ownerId !== req.user!.id && !roleAtLeast(req.user!.role, 'operations')) {
      throw forbidden(`Job ${id} belongs to someone else; only its owner or the operations role may cancel it.`);
    }
    const r = await queueService(ctx).cancel(id, actorOf(req));
    res.status(r.immediate ? 200 : 202).json({
      job: toJobDto(r.job),
      message: r.immediate ? 'Cancelled.' : 'Stopping: the job stops after the window in progress; finished windows are kept and marked partial.',
    });
  });

  router.patch('/:id/priority', requireRole('operations'), async (req, res) => {
    const { priority } = setPrioritySchema.parse(req.body);
    const job = await queueService(ctx).setPriority(jobIdSchema.parse(req.params.id), priority, actorOf(req));
    res.json({ job: toJobDto(job) });
  });

  router.post('/:id/rerun', requireRole('analyst'), async (req, res) => {
    const old = await getJob(ctx.db, jobIdSchema.parse(req.params.id));
    const body = rerunSchema.parse(req.body ?? {});
    if (old.recordingId === null) throw new HttpError(409, 'no_recording', `Job ${old.id} has no recording to rerun on; submit a new job.`);
    const { input, estimates } = await prepareBeamformJob(
      ctx.db,
      {
        name: body.name ?? `${old.name} (rerun)`,
        ownerId: req.user!.id,
        recordingId: old.recordingId,
        ...(body.arrayId !== undefined ? { arrayId: body.arrayId } : {}),
        ...(old.trainingRecordingId !== null ? { trainingRecordingId: old.trainingRecordingId } : {}),
        params: body.params ?? old.params,
        priority: body.priority ?? old.priority,
        ...(body.runAfter ? { runAfter: body.runAfter } : {}),
        maxAttempts: old.maxAttempts,
        rerunOf: old.id,
      },
      old.arraySnapshot ? { arrayId: old.arrayId, geometry: old.arraySnapshot as never } : undefined,
    );
    const job = await queueService(ctx).submit(input, actorOf(req));
    res.status(201).json({ job: toJobDto(job), estimates });
  });

  // Same handler as /api/results/:id/<kind>.csv: one implementation of the download.
  router.get('/:id/weights.csv', resultCsvHandler(ctx, 'weights'));
  router.get('/:id/sinr.csv', resultCsvHandler(ctx, 'sinr'));

  return router;
}
