/**
 * Scale-out on a real PostgreSQL (runs when TEST_DATABASE_URL is set): two headless nodes
 * (`worker/node-main.ts` processes) share one queue and one results folder. 30 small jobs are
 * each done exactly once; a node SIGKILLed mid-job loses its lease and the other node finishes
 * that job from its checkpoint.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { eq, inArray, sql } from 'drizzle-orm';
import { openDatabase, type DatabaseHandle } from '../../server/db/client.js';
import { jobEvents } from '../../server/db/schema/job-events.js';
import { jobs } from '../../server/db/schema/jobs.js';
import type { Actor } from '../../server/queue/actor.js';
import { enqueueJob } from '../../server/queue/enqueue-job.js';
import { getJob } from '../../server/queue/get-job.js';
import { createQueueEvents, type JobProgressEvent } from '../../server/nodes/queue-events.js';
import { RemoteJobWatcher } from '../../server/nodes/remote-job-watcher.js';
import { startHeadlessNode, type HeadlessNode } from './helpers/headless-node.js';
import { createTestDatabaseUrl, insertTestUser } from './helpers/queue-databases.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';



const suite = process.env.TEST_DATABASE_URL ? describe : describe.skip;

suite('scale-out: two headless nodes on PostgreSQL', function () {
  this.timeout(240_000);
  let dir: string;
  let url: string;
  let drop: () => Promise<void>;
  let h: DatabaseHandle;
  const nodes: HeadlessNode[] = [];

  const startNode = (name: string): Promise<HeadlessNode> =>
    startHeadlessNode(
      {
        ...process.env,
        DATABASE_URL: url,
        DATA_DIR: path.join(dir, name),
        RESULTS_DIR: path.join(dir, 'results'),
        WORKER_CONCURRENCY: '1',
        JOB_LEASE_SECONDS: '3',
        JOB_POLL_SECONDS: '0.3',
        JOB_RETRY_BASE_SECONDS: '0.5',
        JOB_RETRY_CAP_SECONDS: '2',
      },
      name,
      120_000,
    );

  before(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-scale-'));
    ({ url, drop } = await createTestDatabaseUrl());
    h = await openDatabase({ dataDir: 'memory://', databaseUrl: url });
  });
  after(async () => {
    for (const n of nodes) if (n.proc.exitCode === null && n.proc.signalCode === null) n.proc.kill('SIGKILL');
    await h?.close();
    await drop?.();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('runs 30 jobs exactly once across two nodes, and finishes a SIGKILLed node\'s job on the other', async () => {
    const owner = await insertTestUser(h);
    const actor: Actor = { kind: 'user', userId: owner, role: 'analyst', email: 'a@test' };
    const shortRec = await insertReadyRecording(h, await writeSceneWav(dir, 2, 'short.wav'), owner);
    // long enough (thousands of windows) that the node is still inside it well after its first stored checkpoint
    const longRec = await insertReadyRecording(h, await writeSceneWav(dir, 60, 'long.wav'), owner);
    const submit = (name: string, recordingId: number, windowHop: number, priority = 0) =>
      enqueueJob(h.db, { name, ownerId: owner, params: sceneParams(windowHop), paramsVersion: 1, recordingId, arraySnapshot: SCENE_ARRAY, priority, maxAttempts: 3 }, actor);

    // the long job goes first (highest priority) so a node is surely in the middle of it
    const long = await submit('long', longRec, 1, 10);
    const small = [];
    for (let i = 0; i < 30; i++) small.push(await submit(`small ${i}`, shortRec, 16));

    // a server on the same database publishes the headless nodes' work as its own events
    const events = createQueueEvents();
    const seen = { progress: [] as JobProgressEvent[], succeeded: new Set<number>() };
    events.on('job:progress', (p) => seen.progress.push(p));
    events.on('job:state', (e) => e.state === 'succeeded' && seen.succeeded.add(e.jobId));
    const watcher = new RemoteJobWatcher(h.db, events, 'server-under-test', 250);
    watcher.start();

    nodes.push(await startNode('a'), await startNode('b'));

    // kill the node that holds the long job once it has checkpointed some windows
    let victim: HeadlessNode | undefined;
    for (let i = 0; i < 2400 && !victim; i++) {
      const j = await getJob(h.db, long.id);
      if (j.state === 'running' && j.checkpointWindow > 0) victim = nodes.find((n) => n.id === j.claimedBy);
      else await new Promise((r) => setTimeout(r, 50));
    }
    expect(victim, 'the long job never checkpointed').to.not.equal(undefined);
    const killedAt = (await getJob(h.db, long.id)).checkpointWindow;
    victim!.proc.kill('SIGKILL');
    const survivor = nodes.find((n) => n !== victim)!;

    const ids = [long.id, ...small.map((s) => s.id)];
    for (let i = 0; ; i++) {
      const rows = await h.db.select({ state: jobs.state }).from(jobs).where(inArray(jobs.id, ids));
      if (rows.every((r) => r.state === 'succeeded' || r.state === 'failed')) break;
      if (i > 3000) throw new Error(`jobs still running; survivor output:\n${survivor.output()}`);
      await new Promise((r) => setTimeout(r, 100));
    }

    const final = await h.db.select().from(jobs).where(inArray(jobs.id, ids));
    for (const j of final) expect(j.state, `job ${j.id}: ${j.lastError}`).to.equal('succeeded');
    // exactly once: one 'succeeded' per job, and every job's records file holds exactly its windows
    const succ = await h.db
      .select({ jobId: jobEvents.jobId, n: sql<number>`count(*)::int` })
      .from(jobEvents)
      .where(sql`${jobEvents.toState} = 'succeeded' and ${inArray(jobEvents.jobId, ids)}`)
      .groupBy(jobEvents.jobId);
    expect(succ).to.have.length(31);
    for (const s of succ) expect(Number(s.n)).to.equal(1);
    const smallRows = final.filter((j) => j.id !== long.id);
    const perJobBytes = new Set(
      smallRows.map((j) => fs.statSync(path.join(dir, 'results', String(j.id), 'windows.f32')).size / j.totalWindows!),
    );
    expect(perJobBytes.size).to.equal(1);

    // both nodes worked; the long job moved from the victim to the survivor through the reaper
    const runs = await h.db.select().from(jobEvents).where(eq(jobEvents.toState, 'running'));
    const byNode = new Set(runs.map((r) => r.actor));
    expect(byNode).to.include(`node:${victim!.id}`);
    expect(byNode).to.include(`node:${survivor.id}`);
    const longHistory = (await h.db.select().from(jobEvents).where(eq(jobEvents.jobId, long.id)).orderBy(jobEvents.id)).map((e) => `${e.toState} ${e.actor} ${e.message ?? ''}`);
    expect(longHistory[1]).to.match(new RegExp(`^running node:${victim!.id}`));
    expect(longHistory[2]).to.match(new RegExp(`^scheduled node:${survivor.id} lease of node ${victim!.id} expired`));
    expect(longHistory[3]).to.match(new RegExp(`^running node:${survivor.id} attempt 2 of 3, resuming at window [1-9]`));
    expect(longHistory.at(-1)).to.match(new RegExp(`^succeeded node:${survivor.id}`));
    const longJob = final.find((j) => j.id === long.id)!;
    expect(longJob.attempts).to.equal(2);
    for (const j of smallRows) expect(j.attempts, `small job ${j.id} ran more than once`).to.equal(1);
    console.log(`      victim killed at checkpoint ${killedAt}/${longJob.totalWindows}; runs per node: ${[...byNode].map((n) => `${n}=${runs.filter((r) => r.actor === n).length}`).join(', ')}`);

    await new Promise((r) => setTimeout(r, 600)); // one more watcher poll
    watcher.stop();
    expect(seen.succeeded.size).to.equal(31);
    expect(seen.progress.some((p) => p.jobId === long.id && p.windowsDone > 0 && p.nodeId === survivor.id)).to.equal(true);

    // a clean stop exits 0 and marks the node stopped
    const exited = new Promise<number | null>((r) => survivor.proc.once('exit', (code) => r(code)));
    survivor.proc.kill('SIGTERM');
    expect(await exited).to.equal(0);
  });
});
