import * as z from 'zod';
import { jobSchema, queueStatusSchema, workerNodeSchema } from '../../../shared/api/jobs.js';
import type { RecordingListResponse } from '../../../shared/api/recordings.js';
import type { ArrayRecord } from '../../../shared/api/arrays.js';

/** Response schemas of the job routes, as the jobs pages read them. */
export const jobListSchema = z.object({ items: z.array(jobSchema), total: z.number().int(), limit: z.number().int(), offset: z.number().int() });
export const jobDetailSchema = z.object({
  job: jobSchema,
  events: z.array(z.object({ at: z.string(), from: z.string().nullable(), to: z.string(), actor: z.string(), message: z.string().nullable() })),
});
export const jobActionSchema = z.object({ job: jobSchema, message: z.string().optional() });
export const submitAnswerSchema = z.object({ job: jobSchema, estimates: z.object({ windows: z.number(), runSeconds: z.number(), outputBytes: z.number() }) });
export const queueAnswerSchema = queueStatusSchema.extend({ message: z.string().optional() });
export const nodesSchema = z.object({ nodes: z.array(workerNodeSchema) });
export const drainAnswerSchema = z.object({ node: z.object({ id: z.string(), draining: z.boolean() }), message: z.string() });
/** The recordings and arrays routes answer with plain interfaces; they are owned and checked there. */
export const recordingListSchema = z.custom<RecordingListResponse>((v) => typeof v === 'object' && v !== null && Array.isArray((v as { items?: unknown }).items));
export const arrayListSchema = z.custom<{ arrays: ArrayRecord[] }>((v) => typeof v === 'object' && v !== null && Array.isArray((v as { arrays?: unknown }).arrays));
/** GET /api/archives as the job form reads it (root choices for a folder batch). */
export const archiveRootsSchema = z.object({ roots: z.array(z.object({ id: z.number().int(), name: z.string(), path: z.string(), recordingCount: z.number().int(), reachable: z.boolean() }).loose()) });
export type ArchiveRootChoice = z.infer<typeof archiveRootsSchema>['roots'][number];
