import * as z from 'zod';

/**
 * A job's life, in order. The order matters: states before 'running' can still be claimed or
 * reprioritised, states after it are final. Which moves are legal lives in one place on the
 * server (server/queue/transitions.ts).
 *  - queued: waiting for a free compute slot;
 *  - scheduled: waiting for its start-after time (an overnight run, or a retry's back-off);
 *  - running: claimed by a node, a compute child works on it under a renewed lease;
 *  - succeeded / failed / cancelled: final.
 */
export const JOB_STATES = ['queued', 'scheduled', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export const jobStateSchema = z.enum(JOB_STATES);
export type JobState = z.infer<typeof jobStateSchema>;

export const FINAL_JOB_STATES: readonly JobState[] = ['succeeded', 'failed', 'cancelled'];
export const isFinalJobState = (s: JobState): boolean => FINAL_JOB_STATES.includes(s);

/** Job kinds the queue knows; each maps to a compute task of the same name (worker/tasks/). */
export const JOB_KINDS = ['beamform'] as const;
export type JobKind = (typeof JOB_KINDS)[number];

/** Priority: higher runs first; equal priorities run first come, first served. */
export const JOB_PRIORITY_MIN = -100;
export const JOB_PRIORITY_MAX = 100;
export const jobPrioritySchema = z
  .number({ error: 'Priority must be a whole number.' })
  .int('Priority must be a whole number.')
  .min(JOB_PRIORITY_MIN, `Priority must be at least ${JOB_PRIORITY_MIN}.`)
  .max(JOB_PRIORITY_MAX, `Priority must be at most ${JOB_PRIORITY_MAX}.`);

/** A job as the API shows it. */
export const jobSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  kind: z.enum(JOB_KINDS),
  ownerId: z.number().int(),
  ownerName: z.string().optional(),
  state: jobStateSchema,
  priority: z.number().int(),
  params: z.unknown(),
  paramsVersion: z.number().int(),
  arrayId: z.number().int().nullable(),
  recordingId: z.number().int().nullable(),
  trainingRecordingId: z.number().int().nullable(),
  runAfter: z.string(),
  attempts: z.number().int(),
  maxAttempts: z.number().int(),
  claimedBy: z.string().nullable(),
  leaseExpiresAt: z.string().nullable(),
  cancelRequested: z.boolean(),
  checkpointWindow: z.number().int(),
  totalWindows: z.number().int().nullable(),
  windowsDone: z.number().int(),
  windowsPerSecond: z.number().nullable(),
  etaSeconds: z.number().nullable(),
  lastError: z.string().nullable(),
  partial: z.boolean(),
  rerunOf: z.number().int().nullable(),
  /** The batch submission (POST /api/jobs/batch) that created this job, if any. */
  batchId: z.number().int().nullable().optional(),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  updatedAt: z.string(),
});
export type JobDto = z.infer<typeof jobSchema>;

/** POST /api/jobs body. `params` is checked against the beamform parameter schema on the server. */
export const submitJobSchema = z.object({
  name: z.string().trim().min(1, 'Give the job a name.').max(200, 'Job names are at most 200 characters.'),
  kind: z.enum(JOB_KINDS, { error: 'kind must be "beamform".' }).default('beamform'),
  recordingId: z.number({ error: 'recordingId must be the id of a ready recording.' }).int(),
  arrayId: z.number().int().optional(),
  trainingRecordingId: z.number().int().optional(),
  params: z.unknown(),
  priority: jobPrioritySchema.default(0),
  /** ISO date-time; the job waits in 'scheduled' until then (overnight runs). */
  runAfter: z.iso.datetime({ offset: true, error: 'runAfter must be an ISO date-time, e.g. 2026-12-03T01:00:00Z.' }).optional(),
  maxAttempts: z.number().int().min(1, 'maxAttempts must be at least 1.').max(10, 'maxAttempts is at most 10.').default(3),
});
export type SubmitJobRequest = z.infer<typeof submitJobSchema>;

/** PATCH /api/jobs/:id/priority body. */
export const setPrioritySchema = z.object({ priority: jobPrioritySchema });

/** GET /api/jobs query. */
export const listJobsQuerySchema = z.object({
  state: z.union([jobStateSchema, z.string().transform((s, ctx) => {
    const parts = s.split(',').map((p) => p.trim()).filter(Boolean);
    for (const p of parts) {
      if (!(JOB_STATES as readonly string[]).includes(p)) {
        ctx.addIssue({ code: 'custom', message: `Unknown state "${p}"; use one or more of ${JOB_STATES.join(', ')}.` });
        return z.NEVER;
      }
    }
    return parts as JobState[];
  })]).optional(),
  owner: z.union([z.literal('me'), z.coerce.number().int()]).optional(),
  batch: z.coerce.number({ error: 'batch must be a batch id (a whole number).' }).int('batch must be a batch id (a whole number).').positive('batch must be a positive batch id.').optional(),
  sort: z.enum(['created', 'priority', 'state', 'name', 'updated'], { error: 'sort must be one of created, priority, state, name, updated.' }).default('created'),
  order: z.enum(['asc', 'desc'], { error: 'order must be asc or desc.' }).default('desc'),
  limit: z.coerce.number().int().min(1, 'limit must be at least 1.').max(200, 'limit is at most 200.').default(50),
  offset: z.coerce.number().int().min(0, 'offset must be 0 or more.').default(0),
});
export type ListJobsQuery = z.infer<typeof listJobsQuerySchema>;

/** GET /api/queue body. */
export const queueStatusSchema = z.object({
  paused: z.boolean(),
  pausedBy: z.number().int().nullable(),
  pausedAt: z.string().nullable(),
  counts: z.record(jobStateSchema, z.number().int()),
});
export type QueueStatus = z.infer<typeof queueStatusSchema>;

/** One node as GET /api/workers shows it. */
export const workerNodeSchema = z.object({
  id: z.string(),
  host: z.string(),
  pid: z.number().int(),
  kind: z.enum(['server', 'headless']),
  startedAt: z.string(),
  heartbeatAt: z.string(),
  heartbeatAgeS: z.number(),
  alive: z.boolean(),
  draining: z.boolean(),
  concurrency: z.number().int(),
  currentJobIds: z.array(z.number().int()),
  windowsPerSecond: z.number(),
  /** Compute children of the node answering the request (the others report only their totals). */
  children: z.array(z.object({ pid: z.number().int(), busy: z.boolean(), task: z.string().optional(), lastHeartbeatAt: z.string() })).optional(),
});
export type WorkerNode = z.infer<typeof workerNodeSchema>;
