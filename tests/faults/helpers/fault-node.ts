/**
 * A real job node for the fault suites: an in-memory PGlite, a forked compute pool (real
 * compute children running the real beamform task), the queue service and a JobNode with
 * short timings, plus helpers to wait for job states and to read a job's result files.
 * Nothing here is simulated: faults are injected by killing processes and changing files.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { text } from 'node:stream/consumers';
import type { JobState } from '../../../shared/api/jobs.js';
import type { BeamformParams } from '../../../shared/params/beamform-params.js';
import { jobResultsDir, resolveBeamformPayload } from '../../../server/nodes/beamform-payload.js';
import { ForkedComputePool } from '../../../server/nodes/compute-pool.js';
import { JobNode } from '../../../server/nodes/job-node.js';
import { JobQueue } from '../../../server/nodes/job-queue.js';
import { createQueueEvents } from '../../../server/nodes/queue-events.js';
import type { Actor } from '../../../server/queue/actor.js';
import { getJob } from '../../../server/queue/get-job.js';
import { createSinrCsvStream, createWeightsCsvStream } from '../../../worker/results/csv-streams.js';
import { RECORDS_FILE } from '../../../worker/results/result-header.js';
import { insertTestUser, openTestDatabase, type TestDatabase } from '../../server/helpers/queue-databases.js';
import { SCENE_ARRAY, sceneParams } from '../../server/helpers/queue-scene.js';

export interface FaultNode {
  dir: string;
  resultsDir: string;
  h: TestDatabase;
  pool: ForkedComputePool;
  node: JobNode;
  queue: JobQueue;
  owner: number;
  actor: Actor;
  submit(name: string, recordingId: number, opts?: { maxAttempts?: number; params?: BeamformParams }): Promise<{ id: number }>;
  waitFor(jobId: number, states: JobState[], timeoutMs?: number): Promise<JobState>;
  outputs(jobId: number): Promise<{ weights: string; sinr: string; records: Buffer }>;
  close(): Promise<void>;
}

export async function startFaultNode(opts: { resultsDir?: string } = {}): Promise<FaultNode> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-faults-'));
  const resultsDir = opts.resultsDir ?? path.join(dir, 'results');
  const h = await openTestDatabase('pglite');
  const owner = await insertTestUser(h);
  const actor: Actor = { kind: 'user', userId: owner, role: 'analyst', email: 'faults@test' };
  const events = createQueueEvents();
  const pool = new ForkedComputePool({ concurrency: 1, idleMs: 60_000, cancelGraceMs: 10_000 });
  const queue = new JobQueue(h.db, events);
  const node = new JobNode({
    db: h.db,
    pool,
    events,
    kind: 'server',
    concurrency: 1,
    payloads: { beamform: resolveBeamformPayload },
    resultsDir,
    leaseMs: 10_000,
    tickMs: 200,
    pollMs: 200,
    heartbeatMs: 500,
    reapMs: 1000,
    backoff: { baseMs: 50, capMs: 200 },
  });
  await node.start();
  const waitFor = async (jobId: number, states: JobState[], timeoutMs = 180_000): Promise<JobState> => {
    const t0 = Date.now();
    for (;;) {
      const job = await getJob(h.db, jobId);
      if (states.includes(job.state)) return job.state;
      if (Date.now() - t0 > timeoutMs) throw new Error(`job ${jobId} still ${job.state} after ${timeoutMs} ms (last error: ${job.lastError})`);
      await new Promise((r) => setTimeout(r, 20));
    }
  };
  return {
    dir,
    resultsDir,
    h,
    pool,
    node,
    queue,
    owner,
    actor,
    submit: (name, recordingId, o = {}) =>
      queue.submit({ name, ownerId: owner, params: o.params ?? sceneParams(), paramsVersion: 1, recordingId, arraySnapshot: SCENE_ARRAY, maxAttempts: o.maxAttempts ?? 3 }, actor),
    waitFor,
    async outputs(jobId) {
      const d = jobResultsDir(resultsDir, jobId);
      return { weights: await text(await createWeightsCsvStream(d)), sinr: await text(await createSinrCsvStream(d)), records: fs.readFileSync(path.join(d, RECORDS_FILE)) };
    },
    async close() {
      await node.stop();
      await pool.close();
      await h.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Resolves once `pred` holds for the job (polled every 10 ms), with the job row. */
export async function waitUntil(h: TestDatabase, jobId: number, pred: (j: Awaited<ReturnType<typeof getJob>>) => boolean, timeoutMs = 180_000) {
  const t0 = Date.now();
  for (;;) {
    const j = await getJob(h.db, jobId);
    if (pred(j)) return j;
    if (Date.now() - t0 > timeoutMs) throw new Error(`job ${jobId}: condition not met after ${timeoutMs} ms (state ${j.state}, ${j.windowsDone}/${j.totalWindows})`);
    await new Promise((r) => setTimeout(r, 10));
  }
}
