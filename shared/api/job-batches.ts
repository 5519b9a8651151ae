import * as z from 'zod';
import { jobPrioritySchema, jobSchema, jobStateSchema } from './jobs.js';

/** Most jobs one batch may create; larger archives are split into several batches. */
export const MAX_BATCH_RECORDINGS = 500;

/** Selects already-registered, ready recordings under a folder of an archive root. */
export const batchArchiveSelectionSchema = z.object({
  rootId: z.number({ error: 'archive.rootId must be the id of an archive root.' }).int(),
  folder: z.string().max(1000, 'archive.folder is at most 1000 characters.').default(''),
  pattern: z.string().default('*'),
  recursive: z.boolean().default(false),
});

/**
 * POST /api/jobs/batch body: one parameter set over many recordings, given either as a list of
 * ids or as an archive folder selection (exactly one of the two).
 */
export const submitBatchSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the batch a name.').max(200, 'Batch names are at most 200 characters.'),
    params: z.unknown(),
    arrayId: z.number().int().optional(),
    priority: jobPrioritySchema.default(0),
    runAfter: z.iso.datetime({ offset: true, error: 'runAfter must be an ISO date-time, e.g. 2026-12-03T01:00:00Z.' }).optional(),
    maxAttempts: z.number().int().min(1, 'maxAttempts must be at least 1.').max(10, 'maxAttempts is at most 10.').default(3),
    recordingIds: z
      .array(z.number({ error: 'recordingIds must be whole-number recording ids.' }).int('recordingIds must be whole-number recording ids.'))
      .min(1, 'recordingIds is empty: choose at least one recording.')
      .max(MAX_BATCH_RECORDINGS, `A batch holds at most ${MAX_BATCH_RECORDINGS} recordings; split the selection into several batches.`)
      .optional(),
    archive: batchArchiveSelectionSchema.optional(),
  })
  .refine((b) => (b.recordingIds === undefined) !== (b.archive === undefined), {
    message: 'Give either recordingIds (a list of recording ids) or archive (rootId, folder, pattern), not both and not neither.',
    path: ['recordingIds'],
  });
export type SubmitBatchRequest = z.infer<typeof submitBatchSchema>;

/** A batch as the API shows it, with how many of its jobs are in each state. */
export const jobBatchSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  ownerId: z.number().int(),
  recordingCount: z.number().int(),
  archiveRootId: z.number().int().nullable(),
  folder: z.string().nullable(),
  pattern: z.string().nullable(),
  recursive: z.boolean().nullable(),
  createdAt: z.string(),
  counts: z.partialRecord(jobStateSchema, z.number().int()).optional(),
  windowsDone: z.number().int().optional(),
  totalWindows: z.number().int().optional(),
});
export type JobBatchDto = z.infer<typeof jobBatchSchema>;

export const submitBatchResponseSchema = z.object({
  batch: jobBatchSchema,
  jobs: z.array(jobSchema),
  estimates: z.object({ windows: z.number(), runSeconds: z.number(), outputBytes: z.number() }),
});
export type SubmitBatchResponse = z.infer<typeof submitBatchResponseSchema>;

/** POST /api/jobs/batches/:id/cancel answer: what happened to the batch's unfinished jobs. */
export const cancelBatchResponseSchema = z.object({
  batchId: z.number().int(),
  /** Queued or scheduled jobs that left the queue at once. */
  cancelled: z.number().int(),
  /** Running jobs asked to stop after their window in progress (finished windows are kept). */
  stopping: z.number().int(),
  /** Jobs that had already ended (succeeded, failed or cancelled) and were left as they are. */
  alreadyEnded: z.number().int(),
  message: z.string(),
});
export type CancelBatchResponse = z.infer<typeof cancelBatchResponseSchema>;
