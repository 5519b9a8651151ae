/**
 * SIGKILL of the compute child at 20 random points of one beamform job: every kill is a failed
 * attempt retried from the last fsynced checkpoint, and the finished job's windows.f32 and both
 * CSVs are byte-identical to an uninterrupted run of the same job. The kill points are drawn
 * from a printed seed (FAULT_SEED=<n> replays them; FAULT_KILLS=<n> changes the count).
 */
import fs from 'node:fs';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { jobEvents } from '../../server/db/schema/job-events.js';
import { getJob } from '../../server/queue/get-job.js';
import { insertReadyRecording, sceneParams, writeSceneWav } from '../server/helpers/queue-scene.js';
import { startFaultNode, waitUntil, type FaultNode } from './helpers/fault-node.js';

const KILLS = Number(process.env.FAULT_KILLS ?? 20);
const seed = Number(process.env.FAULT_SEED ?? Date.now() % 2147483647);

/** A small seeded generator (mulberry32, common practice) so kill points replay from the seed. */
function random(s: number): () => number {
  return () => {
    s = (s + 0x6d2b79f5) | 0;
    let t = Math.imul(s ^ (s >>> 15), 1 | s);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

describe(`faults: SIGKILL of the compute child at ${KILLS} random points of a job (seed ${seed})`, function () {
  this.timeout(900_000);
  let f: FaultNode;
  let recordingId: number;
  const params = sceneParams(1);

  const checkpointSecondsBefore = process.env['JOB_CHECKPOINT_SECONDS'];
  before(async () => {
    console.log(`    kill-point seed: ${seed} (replay with FAULT_SEED=${seed})`);
    // Compute children inherit this: checkpoints every 0.1 s, so most kills find one to resume
    // from however fast the engine runs (with the default 1 s the whole job can take two or three).
    process.env['JOB_CHECKPOINT_SECONDS'] = '0.1';
    f = await startFaultNode();
    recordingId = await insertReadyRecording(f.h, await writeSceneWav(f.dir, 40), f.owner);
  });
  after(async () => {
    await f?.close();
    if (checkpointSecondsBefore === undefined) delete process.env['JOB_CHECKPOINT_SECONDS'];
    else process.env['JOB_CHECKPOINT_SECONDS'] = checkpointSecondsBefore;
  });

  it('finishes with results byte-identical to an uninterrupted run', async () => {
    const ref = await f.submit('uninterrupted', recordingId, { params });
    expect(await f.waitFor(ref.id, ['succeeded', 'failed'])).to.equal('succeeded');
    const reference = await f.outputs(ref.id);
    const total = (await getJob(f.h.db, ref.id)).totalWindows!;

    const rnd = random(seed);
    // up to 85 % of the job: progress reaches the database once per node tick, so a point in the
    // last few percent could be passed between two ticks by an attempt that then simply finishes
    const points = Array.from({ length: KILLS }, () => 0.02 + 0.83 * rnd()).sort((a, b) => a - b).map((x) => Math.floor(x * total));
    const job = await f.submit('killed repeatedly', recordingId, { params, maxAttempts: KILLS + 1 });
    const kills: { target: number; atWindow: number; checkpoint: number }[] = [];
    for (const target of points) {
      // the attempt after the previous kill is running, its child is busy, and the job has reached the point
      const attempt = kills.length + 1;
      const j = await waitUntil(f.h, job.id, (x) => x.state !== 'running' && x.state !== 'scheduled' && x.state !== 'queued' ? true : x.state === 'running' && x.attempts === attempt && x.windowsDone >= target && f.pool.busyPids().length > 0);
      if (j.state !== 'running') break;
      for (const pid of f.pool.busyPids()) process.kill(pid, 'SIGKILL');
      kills.push({ target, atWindow: j.windowsDone, checkpoint: j.checkpointWindow });
      await waitUntil(f.h, job.id, (x) => x.state !== 'running' || x.attempts > attempt);
    }
    expect(await f.waitFor(job.id, ['succeeded', 'failed'])).to.equal('succeeded');
    const done = await getJob(f.h.db, job.id);
    expect(kills.length, 'the job ended before every kill point was reached').to.equal(KILLS);
    expect(done.attempts).to.equal(KILLS + 1);
    const history = await f.h.db.select().from(jobEvents).where(eq(jobEvents.jobId, job.id)).orderBy(jobEvents.id);
    const retries = history.filter((e) => e.toState === 'scheduled');
    expect(retries).to.have.length(KILLS);
    for (const r of retries) expect(r.message).to.match(/exited on signal SIGKILL/);
    const resumedFrom = history.filter((e) => e.toState === 'running').map((e) => Number(/resuming at window (\d+)/.exec(e.message ?? '')?.[1] ?? 0));
    expect(resumedFrom.filter((w) => w > 0).length, 'resumes from a checkpoint, not from the start').to.be.greaterThan(KILLS / 2);

    const got = await f.outputs(job.id);
    expect(got.records.length).to.equal(reference.records.length);
    expect(got.records.equals(reference.records), 'windows.f32 differs from the uninterrupted run').to.equal(true);
    expect(got.weights === reference.weights, 'weights CSV differs').to.equal(true);
    expect(got.sinr === reference.sinr, 'SINR CSV differs').to.equal(true);
    // no stray files left by the killed attempts beside the results
    expect(fs.readdirSync(f.resultsDir).length).to.equal(2);
    console.log(`      ${total} windows; killed at ${kills.map((k) => `${k.atWindow}`).join(', ')}; resumed from ${resumedFrom.join(', ')}`);
  });
});
