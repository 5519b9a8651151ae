import * as z from 'zod';
import { jobSchema, queueStatusSchema, workerNodeSchema } from './jobs.js';

/**
 * The live channel: one WebSocket per browser tab at LIVE_PATH, opened with the session cookie
 * (refused without one). The browser subscribes to topics; the server pushes the current state
 * of whatever changed. Messages are state, not deltas, so a missed message is healed by the next
 * one or by the REST resync every client does after (re)connecting.
 *
 * Topics:
 *  - 'jobs': every job's state and progress (the jobs table);
 *  - 'queue': the queue switches (paused) and counts;
 *  - 'nodes': worker-node health (operations role and above);
 *  - 'job:<id>': new per-window summaries of that job for live plots, from `fromWindow` on.
 */
export const LIVE_PATH = '/api/live';

/** Close codes of our own (4000–4999 are for applications). */
export const LIVE_CLOSE = { signedOut: 4401, shuttingDown: 4503 } as const;

export const liveTopicSchema = z.string().regex(/^(jobs|queue|nodes|job:\d+)$/, 'topics are "jobs", "queue", "nodes" or "job:<id>"');
export type LiveTopic = z.infer<typeof liveTopicSchema>;

export const liveClientMessageSchema = z.discriminatedUnion('type', [
  z.object({
    type: z.literal('subscribe'),
    topics: z.array(liveTopicSchema).min(1).max(50),
    /** For 'job:<id>' topics: the first window the client does not have yet (default 0). */
    fromWindow: z.record(z.string(), z.number().int().min(0)).optional(),
  }),
  z.object({ type: z.literal('unsubscribe'), topics: z.array(liveTopicSchema).min(1).max(50) }),
  z.object({ type: z.literal('ping'), sentAt: z.number() }),
]);
export type LiveClientMessage = z.infer<typeof liveClientMessageSchema>;

/**
 * One window of a job as the live plots need it: broadband power of each beam (adaptive and
 * conventional) and broadband SINR, in dB with the CSV's rounding (3 decimals), null where the
 * CSV leaves the field empty (not positive or not estimated). Beam order is run.json's fan.
 */
export const windowSummarySchema = z.object({
  window: z.number().int(),
  tStartS: z.number(),
  tEndS: z.number(),
  adaptiveDb: z.array(z.number().nullable()),
  conventionalDb: z.array(z.number().nullable()),
  sinrDb: z.array(z.number().nullable()),
});
export type WindowSummaryDto = z.infer<typeof windowSummarySchema>;

export const liveServerMessageSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('welcome'), userId: z.number().int(), role: z.string(), serverTime: z.string() }),
  z.object({ type: z.literal('job'), job: jobSchema }),
  z.object({ type: z.literal('queue'), status: queueStatusSchema }),
  z.object({ type: z.literal('node'), node: workerNodeSchema }),
  z.object({ type: z.literal('windows'), jobId: z.number().int(), windowsStored: z.number().int(), totalWindows: z.number().int(), windows: z.array(windowSummarySchema) }),
  /** A subscription the server would not take (wrong role, bad topic), said plainly. */
  z.object({ type: z.literal('refused'), topic: z.string().optional(), message: z.string() }),
  z.object({ type: z.literal('pong'), sentAt: z.number(), serverTime: z.string() }),
]);
export type LiveServerMessage = z.infer<typeof liveServerMessageSchema>;
