/**
 * The live channel with several nodes on one PostgreSQL (runs when TEST_DATABASE_URL is set):
 * a server on PostgreSQL whose own node is drained, plus a headless node process
 * (`worker/node-main.ts`) sharing the database and the results folder. The job runs on the
 * headless node, so everything the signed-in socket sees reached the server only through the
 * database (triggers → live_changes → NOTIFY/poll). The socket must see queued → running →
 * succeeded, progress and window summaries; after a hard drop mid-job and a REST resync it must
 * end with the database's final state and every window exactly once.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { and, eq, sql } from 'drizzle-orm';
import WebSocket from 'ws';
import type { JobDto } from '../../shared/api/jobs.js';
import { LIVE_PATH, liveServerMessageSchema, type LiveServerMessage } from '../../shared/api/live.js';
import { demoJobParams } from '../../server/demo/demo-job-params.js';
import { LIVE_NOTIFY_CHANNEL } from '../../server/live/change-feed.js';
import { jobEvents } from '../../server/db/schema/job-events.js';
import { recordings } from '../../server/db/schema/recordings.js';
import { startHeadlessNode, type HeadlessNode } from './helpers/headless-node.js';
import { createTestDatabaseUrl } from './helpers/queue-databases.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

const wsUrl = (server: TestServer) => server.url.replace(/^http/, 'ws') + LIVE_PATH;
const cookieOf = (c: TestClient) => [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ');

/** Opens a signed-in socket and collects every parsed server message from the first frame on. */
function open(url: string, cookie: string): Promise<{ ws: WebSocket; seen: LiveServerMessage[] }> {
  return new Promise((resolve, reject) => {
    const ws = new WebSocket(url, { headers: { Cookie: cookie } });
    const seen: LiveServerMessage[] = [];
    ws.on('message', (data) => seen.push(liveServerMessageSchema.parse(JSON.parse(data.toString()))));
    ws.once('open', () => resolve({ ws, seen }));
    ws.once('unexpected-response', (_req, res) => reject(new Error(`live socket refused with HTTP ${res.statusCode}`)));
    ws.once('error', reject);
  });
}

async function until<T>(what: string, fn: () => T | undefined | false | Promise<T | undefined | false>, timeoutMs = 90_000, why: () => string = () => ''): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}${why() ? `\n${why()}` : ''}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

const windowsOf = (seen: LiveServerMessage[]) => seen.flatMap((m) => (m.type === 'windows' ? m.windows : []));
/** The job's states as the socket saw them, repeats folded (messages carry state, so a batch may resend it). */
const statesOf = (seen: LiveServerMessage[], jobId: number) =>
  seen.flatMap((m) => (m.type === 'job' && m.job.id === jobId ? [m.job.state] : [])).filter((s, i, all) => i === 0 || all[i - 1] !== s);

if (!process.env.TEST_DATABASE_URL) {
  describe('live channel on PostgreSQL with a headless node', () => {
    it('needs a real PostgreSQL server: set TEST_DATABASE_URL=postgres://... (.ci/run starts one) to run this suite');
  });
} else {
  describe('live channel on PostgreSQL with a headless node', function () {
    this.timeout(180_000);
    let dir: string;
    let drop: (() => Promise<void>) | undefined;
    let server: TestServer | undefined;
    let headless: HeadlessNode | undefined;

    const startHeadless = (url: string): Promise<HeadlessNode> =>
      startHeadlessNode({
        PATH: process.env.PATH ?? '',
        HOME: process.env.HOME ?? '',
        DATABASE_URL: url,
        DATA_DIR: path.join(dir, 'headless'),
        RESULTS_DIR: path.join(dir, 'results'),
        WORKER_CONCURRENCY: '1',
        JOB_POLL_SECONDS: '0.3',
      });

    before(async () => {
      dir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-livepg-'));
      const db = await createTestDatabaseUrl();
      drop = db.drop;
      server = await startTestServer({
        env: { DATABASE_URL: db.url, RESULTS_DIR: path.join(dir, 'results'), JOB_POLL_SECONDS: '0.3' },
      });
      // The server's own node claims nothing from here on: the headless node must run the job.
      const ownNode = server.ctx.services.jobNode!.id;
      const ops = await server.signIn('operations');
      const drained = await ops.post(`/api/workers/${encodeURIComponent(ownNode)}/drain`, { draining: true });
      expect(drained.status, await drained.clone().text()).to.equal(200);
      await server.ctx.services.recordingKit!.inspector.idle();
      headless = await startHeadless(db.url);
    });

    after(async () => {
      if (headless && headless.proc.exitCode === null && headless.proc.signalCode === null) {
        const exited = new Promise((r) => headless!.proc.once('exit', r));
        headless.proc.kill('SIGTERM');
        await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
        if (headless.proc.exitCode === null) headless.proc.kill('SIGKILL');
      }
      await server?.close();
      await drop?.();
      fs.rmSync(dir, { recursive: true, force: true });
    });

    it('pushes a job run by the headless node; a socket dropped mid-job resyncs to the database\'s final state', async () => {
      const srv = server!;
      const analyst = await srv.signIn('analyst');
      const [wav] = await srv.ctx.db.select().from(recordings).where(eq(recordings.name, 'gannet-ledge-8ch.wav'));
      expect(wav?.state, 'demo WAV inspected').to.equal('ready');

      // A finer fan than the demo's (4× the beams) keeps the job running for several seconds even
      // on a fast machine, so the socket can be dropped while it is surely still running.
      const slowParams = { ...demoJobParams(1), beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 0.25 } };
      const first = await open(wsUrl(srv), cookieOf(analyst));
      first.ws.send(JSON.stringify({ type: 'subscribe', topics: ['jobs', 'queue'] }));
      await until('welcome', () => first.seen.some((m) => m.type === 'welcome'));

      const res = await analyst.post('/api/jobs', { name: 'live on PostgreSQL', recordingId: wav.id, params: slowParams });
      expect(res.status, await res.clone().text()).to.equal(201);
      const { job } = (await res.json()) as { job: JobDto };
      first.ws.send(JSON.stringify({ type: 'subscribe', topics: [`job:${job.id}`] }));

      const log = () => `headless node output:\n${headless!.output()}`;
      await until('queued state', () => statesOf(first.seen, job.id).includes('queued'), 30_000, log);
      await until(
        'running progress with stored windows',
        () => first.seen.some((m) => m.type === 'job' && m.job.id === job.id && m.job.state === 'running' && m.job.checkpointWindow > 0),
        90_000,
        log,
      );
      await until('first window summaries', () => windowsOf(first.seen).length > 0, 30_000, log);
      // A second progress message proves progress keeps flowing, not only the state change.
      await until(
        'progress growing',
        () => new Set(first.seen.flatMap((m) => (m.type === 'job' && m.job.id === job.id && m.job.state === 'running' ? [m.job.windowsDone] : []))).size >= 2,
        30_000,
        log,
      );
      first.ws.terminate();
      const windowsBefore = windowsOf(first.seen);
      const statesBefore = statesOf(first.seen, job.id);
      expect(statesBefore.slice(0, 2), 'queued then running, in order').to.deep.equal(['queued', 'running']);
      expect(first.seen.some((m) => m.type === 'queue')).to.equal(true);
      expect(
        windowsBefore.map((w) => w.window),
        'windows before the drop: in order from 0',
      ).to.deep.equal(Array.from({ length: windowsBefore.length }, (_, i) => i));

      await new Promise((r) => setTimeout(r, 1500)); // the headless node keeps going while we are away

      const second = await open(wsUrl(srv), cookieOf(analyst));
      const have = windowsBefore.length;
      second.ws.send(JSON.stringify({ type: 'subscribe', topics: ['jobs', `job:${job.id}`], fromWindow: { [`job:${job.id}`]: have } }));
      let latest = (await analyst.getJson<{ job: JobDto }>(`/api/jobs/${job.id}`)).job;
      const final = await until(
        'succeeded after the reconnect',
        () => {
          for (const m of second.seen) if (m.type === 'job' && m.job.id === job.id && m.job.updatedAt >= latest.updatedAt) latest = m.job;
          return latest.state === 'succeeded' ? latest : undefined;
        },
        120_000,
        log,
      );
      await until('all windows', () => have + windowsOf(second.seen).length >= final.totalWindows!, 30_000);
      second.ws.close();
      console.log(`      dropped after ${have} of ${final.totalWindows} windows; states seen ${[...statesBefore, '|', ...statesOf(second.seen, job.id)].join(' ')}`);

      // What the socket ended with is what the database holds.
      const db = (await analyst.getJson<{ job: JobDto }>(`/api/jobs/${job.id}`)).job;
      expect(final.state).to.equal(db.state);
      expect(final.windowsDone).to.equal(db.windowsDone);
      expect(final.checkpointWindow).to.equal(db.checkpointWindow);
      const pushed = [...windowsBefore, ...windowsOf(second.seen)];
      expect(pushed.map((w) => w.window), 'each window exactly once, in order').to.deep.equal(Array.from({ length: final.totalWindows! }, (_, i) => i));
      const page = await analyst.getJson<{ windows: unknown[] }>(`/api/plots/${job.id}/windows`);
      expect(pushed).to.deep.equal(page.windows);

      // And the headless node, not the drained server node, ran it.
      const runs = await srv.ctx.db.select().from(jobEvents).where(and(eq(jobEvents.jobId, job.id), eq(jobEvents.toState, 'running')));
      expect(runs.map((r) => r.actor)).to.deep.equal([`node:${headless!.id}`]);
    });

    it('survives losing its LISTEN connection (PostgreSQL restarted or the backend killed) and listens again', async () => {
      const srv = server!;
      const listeners = async () => {
        const r = await srv.ctx.db.execute(
          sql`select pid from pg_stat_activity where datname = current_database() and query = ${`LISTEN ${LIVE_NOTIFY_CHANNEL}`}`,
        );
        return (r as unknown as { rows: { pid: number }[] }).rows.map((x) => x.pid);
      };
      const [before] = await until('the feed\'s LISTEN connection', async () => ((await listeners()).length ? await listeners() : undefined), 10_000);
      await srv.ctx.db.execute(sql`select pg_terminate_backend(${before})`);
      // The feed opens a new listening connection by itself, and the server keeps answering.
      const again = await until('a new LISTEN connection', async () => {
        const pids = await listeners();
        return pids.length && !pids.includes(before) ? pids : undefined;
      }, 20_000);
      expect(again).to.have.length(1);
      const health = await srv.client().get('/api/health');
      expect(health.status).to.equal(200);
    });
  });
}
