/**
 * A node with real compute children running real beamform jobs on PGlite: success with
 * progress, SIGKILL of the compute child at random points (retried from the checkpoint,
 * results byte-identical to an uninterrupted run), cancel of a running job (latency measured,
 * windows kept, partial), a permanent failure, and release on shutdown.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { text } from 'node:stream/consumers';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import type { JobState } from '../../shared/api/jobs.js';
import { jobEvents } from '../../server/db/schema/job-events.js';
import { jobResultsDir, resolveBeamformPayload } from '../../server/nodes/beamform-payload.js';
import { ForkedComputePool } from '../../server/nodes/compute-pool.js';
import { JobNode } from '../../server/nodes/job-node.js';
import { JobQueue } from '../../server/nodes/job-queue.js';
import { createQueueEvents, type JobProgressEvent } from '../../server/nodes/queue-events.js';
import type { Actor } from '../../server/queue/actor.js';
import { claimJob } from '../../server/queue/claim-job.js';
import { getJob } from '../../server/queue/get-job.js';
import { createSinrCsvStream, createWeightsCsvStream } from '../../worker/results/csv-streams.js';
import { RECORDS_FILE } from '../../worker/results/result-header.js';
import { insertTestUser, openTestDatabase, type TestDatabase } from './helpers/queue-databases.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';

describe('job node: real beamform jobs in compute children (pglite)', function () {
  this.timeout(240_000);
  let h: TestDatabase;
  let dir: string;
  let resultsDir: string;
  let owner: number;
  let actor: Actor;
  let recordingId: number;
  const events = createQueueEvents();
  let pool: ForkedComputePool;
  let node: JobNode;
  let queue: JobQueue;
  const nodeOptions = () => ({
    db: h.db,
    pool,
    events,
    kind: 'server' as const,
    concurrency: 1,
    payloads: { beamform: resolveBeamformPayload },
    resultsDir,
    leaseMs: 10_000,
    tickMs: 250,
    pollMs: 300,
    heartbeatMs: 500,
    reapMs: 1000,
    backoff: { baseMs: 100, capMs: 400 },
  });
  let reference: { weights: string; sinr: string; records: Buffer };

  const checkpointSecondsBefore = process.env['JOB_CHECKPOINT_SECONDS'];
  before(async () => {
    // Compute children inherit this: a checkpoint every 0.1 s gives the kill test several
    // checkpoints per attempt however fast the engine runs.
    process.env['JOB_CHECKPOINT_SECONDS'] = '0.1';
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-nodes-'));
    resultsDir = path.join(dir, 'results');
    h = await openTestDatabase('pglite');
    owner = await insertTestUser(h);
    actor = { kind: 'user', userId: owner, role: 'analyst', email: 'a@test' };
    recordingId = await insertReadyRecording(h, await writeSceneWav(dir, 12), owner);
    pool = new ForkedComputePool({ concurrency: 1, idleMs: 60_000, cancelGraceMs: 10_000 });
    queue = new JobQueue(h.db, events);
    node = new JobNode(nodeOptions());
    await node.start();
  });
  after(async () => {
    await node?.stop();
    await pool?.close();
    if (checkpointSecondsBefore === undefined) delete process.env['JOB_CHECKPOINT_SECONDS'];
    else process.env['JOB_CHECKPOINT_SECONDS'] = checkpointSecondsBefore;
    await h?.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const submit = (name: string, extra: { maxAttempts?: number; recordingId?: number } = {}) =>
    queue.submit(
      { name, ownerId: owner, params: sceneParams(2), paramsVersion: 1, recordingId: extra.recordingId ?? recordingId, arraySnapshot: SCENE_ARRAY, maxAttempts: extra.maxAttempts ?? 3 },
      actor,
    );

  /** Resolves when the job reaches one of `states` (event or poll, whichever first). */
  async function waitFor(jobId: number, states: JobState[], timeoutMs = 120_000): Promise<JobState> {
    const t0 = Date.now();
    for (;;) {
      const job = await getJob(h.db, jobId);
      if (states.includes(job.state)) return job.state;
      if (Date.now() - t0 > timeoutMs) throw new Error(`job ${jobId} still ${job.state} after ${timeoutMs} ms (last error: ${job.lastError})`);
      await new Promise((r) => setTimeout(r, 50));
    }
  }

  async function outputs(jobId: number) {
    const d = jobResultsDir(resultsDir, jobId);
    return { weights: await text(await createWeightsCsvStream(d)), sinr: await text(await createSinrCsvStream(d)), records: fs.readFileSync(path.join(d, RECORDS_FILE)) };
  }

  it('runs a job to success, publishing progress at least once a second', async () => {
    const progress: JobProgressEvent[] = [];
    const onProgress = (p: JobProgressEvent) => progress.push(p);
    events.on('job:progress', onProgress);
    const job = await submit('uninterrupted');
    const state = await waitFor(job.id, ['succeeded', 'failed']);
    events.off('job:progress', onProgress);
    const done = await getJob(h.db, job.id);
    expect(state, String(done.lastError)).to.equal('succeeded');
    expect(done.totalWindows).to.be.greaterThan(300);
    expect(done).to.include({ windowsDone: done.totalWindows, checkpointWindow: done.totalWindows, attempts: 1, partial: false });
    const mine = progress.filter((p) => p.jobId === job.id);
    expect(mine.length).to.be.greaterThan(0);
    for (let i = 1; i < mine.length; i++) {
      expect(Date.parse(mine[i].at) - Date.parse(mine[i - 1].at)).to.be.at.most(1500); // ticks every 250 ms; slack for a loaded machine
      expect(mine[i].windowsDone).to.be.at.least(mine[i - 1].windowsDone);
    }
    reference = await outputs(job.id);
    expect(reference.weights.split('\n').filter((l) => !l.startsWith('#')).length).to.be.greaterThan(1000);
  });

  it('survives SIGKILL of its compute child at random points: retried from the checkpoint, results byte-identical', async () => {
    // A 60-second recording (about two thousand windows) so both kills land mid-job on a fast
    // machine; its uninterrupted run is the reference.
    const longRec = await insertReadyRecording(h, await writeSceneWav(dir, 60, 'long.wav'), owner);
    const uninterrupted = await submit('long reference', { recordingId: longRec });
    expect(await waitFor(uninterrupted.id, ['succeeded', 'failed'])).to.equal('succeeded');
    const longReference = await outputs(uninterrupted.id);
    const job = await submit('killed', { maxAttempts: 6, recordingId: longRec });
    const kills: { atWindow: number; checkpoint: number }[] = [];
    let total = 0;
    for (let k = 0; k < 2; k++) {
      await waitFor(job.id, ['running']);
      // a random point: after the job passes a random fraction of its windows
      const fraction = 0.15 + Math.random() * 0.6;
      // once a checkpoint exists, and (after a retry) once this attempt has done windows of its own
      const resumedFrom = kills.at(-1)?.checkpoint ?? 0;
      for (;;) {
        const j = await getJob(h.db, job.id);
        total = j.totalWindows ?? total;
        if (j.state !== 'running') break;
        if (total > 0 && j.checkpointWindow > 0 && j.windowsDone > resumedFrom && j.windowsDone >= fraction * total && pool.busyPids().length) {
          for (const pid of pool.busyPids()) process.kill(pid, 'SIGKILL');
          kills.push({ atWindow: j.windowsDone, checkpoint: j.checkpointWindow });
          break;
        }
        await new Promise((r) => setTimeout(r, 20));
      }
      await waitFor(job.id, ['scheduled', 'succeeded', 'failed']);
    }
    const state = await waitFor(job.id, ['succeeded', 'failed']);
    const done = await getJob(h.db, job.id);
    expect(state, String(done.lastError)).to.equal('succeeded');
    expect(kills.length, 'the job finished before it could be killed twice').to.equal(2);
    expect(done.attempts).to.equal(3);
    const history = await h.db.select().from(jobEvents).where(eq(jobEvents.jobId, job.id)).orderBy(jobEvents.id);
    const retries = history.filter((e) => e.toState === 'scheduled');
    expect(retries).to.have.length(2);
    for (const r of retries) expect(r.message).to.match(/exited on signal SIGKILL/);
    expect(history.filter((e) => e.toState === 'running').some((e) => /resuming at window [1-9]/.test(e.message ?? ''))).to.equal(true);
    const got = await outputs(job.id);
    expect(got.records.equals(longReference.records), 'windows.f32 differs from the uninterrupted run').to.equal(true);
    expect(got.weights === longReference.weights, 'weights.csv differs').to.equal(true);
    expect(got.sinr === longReference.sinr, 'sinr.csv differs').to.equal(true);
    console.log(`      killed at windows ${kills.map((k) => `${k.atWindow} (checkpoint ${k.checkpoint})`).join(', ')} of ${total}`);
  });

  it('cancels a running job between windows, keeps the finished windows and marks it partial (latency measured)', async () => {
    const job = await submit('cancel me');
    await waitFor(job.id, ['running']);
    for (;;) {
      const j = await getJob(h.db, job.id);
      if (j.windowsDone >= 20) break;
      await new Promise((r) => setTimeout(r, 20));
    }
    const t0 = performance.now();
    const { immediate } = await queue.cancel(job.id, actor);
    expect(immediate).to.equal(false);
    const state = await waitFor(job.id, ['cancelled', 'succeeded', 'failed']);
    const latencyMs = performance.now() - t0;
    const done = await getJob(h.db, job.id);
    expect(state).to.equal('cancelled');
    expect(done.partial).to.equal(true);
    expect(done.checkpointWindow).to.be.greaterThan(0);
    expect(done.checkpointWindow).to.be.lessThan(done.totalWindows!);
    // the windows kept are whole records on disk, identical to the uninterrupted run's first ones
    const records = fs.readFileSync(path.join(jobResultsDir(resultsDir, job.id), RECORDS_FILE));
    const perWindow = reference.records.length / done.totalWindows!;
    expect(records.length).to.equal(done.checkpointWindow * perWindow);
    expect(records.equals(reference.records.subarray(0, records.length))).to.equal(true);
    console.log(`      cancel latency (request to cancelled): ${latencyMs.toFixed(0)} ms`);
    expect(latencyMs).to.be.lessThan(10_000);
  });

  it('fails at once, with a clear reason, when the recording is gone (no retry)', async () => {
    const missing = path.join(dir, 'gone.wav');
    fs.copyFileSync(await writeSceneWav(dir, 12), missing);
    const rid = await insertReadyRecording(h, missing, owner);
    fs.rmSync(missing);
    const job = await submit('missing file', { recordingId: rid });
    expect(await waitFor(job.id, ['failed', 'succeeded', 'scheduled'])).to.equal('failed');
    const done = await getJob(h.db, job.id);
    expect(done.attempts).to.equal(1);
    expect(done.lastError).to.match(/its file .*gone\.wav is missing or unreadable \(ENOENT\); restore the file or re-register the recording\./);
  });

  it('on the embedded database, a restarted server takes back jobs a crashed process left running, without waiting out the lease', async () => {
    await node.stop();
    // the "crashed" process: claimed with a 10-minute lease and never heard from again
    const job = await submit('orphan');
    await new Promise((r) => setTimeout(r, 50));
    const claimed = await claimJob(h.db, 'crashed-process', 600_000);
    expect(claimed?.id).to.equal(job.id);
    node = new JobNode({ ...nodeOptions(), soleNode: true });
    const t0 = Date.now();
    await node.start();
    expect(await waitFor(job.id, ['succeeded', 'failed'], 60_000)).to.equal('succeeded');
    expect(Date.now() - t0).to.be.lessThan(60_000);
    const history = await h.db.select().from(jobEvents).where(eq(jobEvents.jobId, job.id)).orderBy(jobEvents.id);
    expect(history.some((e) => /lease of node crashed-process expired/.test(e.message ?? ''))).to.equal(true);
  });
});
