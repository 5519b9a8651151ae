/**
 * The live channel end to end on a real server: the WebSocket refuses anyone without a
 * signed-in session, pushes job state, progress and per-window summaries of a real job run
 * through the queue, and a client that loses its socket mid-job and resyncs from the REST API
 * ends with the same state and every window (nothing missed, nothing doubled).
 */
import { expect } from 'chai';
import WebSocket from 'ws';
import type { JobDto } from '../../shared/api/jobs.js';
import { LIVE_PATH, liveServerMessageSchema, type LiveServerMessage } from '../../shared/api/live.js';
import { demoJobParams } from '../../server/demo/demo-job-params.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';
import { recordings } from '../../server/db/schema/recordings.js';
import { eq } from 'drizzle-orm';

const wsUrl = (server: TestServer) => server.url.replace(/^http/, 'ws') + LIVE_PATH;
const cookieOf = (c: TestClient) => [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ');

/** Opens a socket (or reports the HTTP status it was refused with). */
function open(url: string, headers: Record<string, string> = {}): Promise<{ ws?: WebSocket; seen: LiveServerMessage[]; status?: number; body?: string }> {
  return new Promise((resolve) => {
    const ws = new WebSocket(url, { headers });
    // Listen before 'open' resolves: the first frame can arrive with the handshake.
    const seen = collect(ws);
    ws.once('open', () => resolve({ ws, seen }));
    ws.once('unexpected-response', (_req, res) => {
      let body = '';
      res.on('data', (c: Buffer) => (body += c.toString()));
      res.on('end', () => resolve({ status: res.statusCode, body, seen }));
    });
    ws.once('error', () => resolve({ status: -1, seen }));
  });
}

/** Collects parsed server messages of a socket. */
function collect(ws: WebSocket): LiveServerMessage[] {
  const seen: LiveServerMessage[] = [];
  ws.on('message', (data) => seen.push(liveServerMessageSchema.parse(JSON.parse(data.toString()))));
  return seen;
}

async function until<T>(what: string, fn: () => T | undefined | false | Promise<T | undefined | false>, timeoutMs = 120_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('live channel (WebSocket fan-out)', function () {
  this.timeout(300_000);
  let server: TestServer;
  let analyst: TestClient;
  let recordingId: number;

  before(async () => {
    server = await startTestServer();
    await server.ctx.services.recordingKit!.inspector.idle();
    const [wav] = await server.ctx.db.select().from(recordings).where(eq(recordings.name, 'gannet-ledge-8ch.wav'));
    expect(wav?.state, 'demo WAV inspected').to.equal('ready');
    recordingId = wav.id;
    analyst = await server.signIn('analyst');
  });
  after(async () => server?.close());

  it('refuses an upgrade without a signed-in session, and one from another site', async () => {
    const anon = await open(wsUrl(server));
    expect(anon.status).to.equal(401);
    expect(anon.body).to.match(/Sign in first/);
    const forged = await open(wsUrl(server), { Cookie: 'nullsmith.sid=s%3Anot-a-session.xyz' });
    expect(forged.status).to.equal(401);
    const cross = await open(wsUrl(server), { Cookie: cookieOf(analyst), Origin: 'http://elsewhere.example' });
    expect(cross.status).to.equal(403);
  });

  it('refuses worker-node health to an analyst, with a reason', async () => {
    const { ws, seen } = await open(wsUrl(server), { Cookie: cookieOf(analyst) });
    ws!.send(JSON.stringify({ type: 'subscribe', topics: ['nodes'] }));
    ws!.send('not json');
    await until('refusals', () => seen.filter((m) => m.type === 'refused').length >= 2);
    const refusals = seen.filter((m) => m.type === 'refused');
    expect(refusals[0]).to.include({ topic: 'nodes' });
    expect(refusals[1].message).to.match(/not JSON/);
    ws!.close();
  });

  it('pushes a real job live; a socket dropped mid-job resyncs and misses no state or window', async () => {
    const first = await open(wsUrl(server), { Cookie: cookieOf(analyst) });
    const before = first.seen;
    first.ws!.send(JSON.stringify({ type: 'subscribe', topics: ['jobs', 'queue'] }));
    await until('welcome', () => before.some((m) => m.type === 'welcome'));

    // A finer fan than the demo's (4× the beams) and a quarter of its frame hop (4× the windows)
    // keep the job running for several progress ticks, so the socket is cut while it runs even
    // with the SIMD engine (about 4 s of work here).
    const params = { ...demoJobParams(1), hop: 32, beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 0.25 } };
    const res = await analyst.post('/api/jobs', { name: 'live fan-out check', recordingId, params });
    expect(res.status, await res.clone().text()).to.equal(201);
    const { job } = (await res.json()) as { job: JobDto };
    first.ws!.send(JSON.stringify({ type: 'subscribe', topics: [`job:${job.id}`] }));

    // Wait for running progress with some stored windows, then cut the socket hard.
    await until('progress', () => before.some((m) => m.type === 'job' && m.job.id === job.id && m.job.state === 'running' && m.job.checkpointWindow > 0));
    await until('first windows', () => before.some((m) => m.type === 'windows'));
    first.ws!.terminate();
    const windowsBefore = before.flatMap((m) => (m.type === 'windows' ? m.windows : []));
    const statesBefore = before.flatMap((m) => (m.type === 'job' && m.job.id === job.id ? [m.job.state] : []));
    expect(statesBefore).to.include('running');
    expect(before.some((m) => m.type === 'queue')).to.equal(true);

    await new Promise((r) => setTimeout(r, 1500)); // changes happen while disconnected

    // Reconnect, resubscribe from the first missing window, resync state from REST.
    const second = await open(wsUrl(server), { Cookie: cookieOf(analyst) });
    const after = second.seen;
    const have = windowsBefore.length;
    second.ws!.send(JSON.stringify({ type: 'subscribe', topics: ['jobs', `job:${job.id}`], fromWindow: { [`job:${job.id}`]: have } }));
    const rest = await analyst.getJson<{ job: JobDto }>(`/api/jobs/${job.id}`);
    let latest = rest.job;
    const final = await until('succeeded', () => {
      for (const m of after) if (m.type === 'job' && m.job.id === job.id && m.job.updatedAt >= latest.updatedAt) latest = m.job;
      return latest.state === 'succeeded' ? latest : undefined;
    });
    await until('all windows', () => {
      const n = after.flatMap((m) => (m.type === 'windows' ? m.windows : [])).length;
      return have + n >= final.totalWindows! ? true : undefined;
    }, 30_000);
    second.ws!.close();

    const all = [...windowsBefore, ...after.flatMap((m) => (m.type === 'windows' ? m.windows : []))].map((w) => w.window);
    expect(all, 'each window exactly once, in order').to.deep.equal(Array.from({ length: final.totalWindows! }, (_, i) => i));
    const db = await analyst.getJson<{ job: JobDto }>(`/api/jobs/${job.id}`);
    expect(final.state).to.equal(db.job.state);
    expect(final.windowsDone).to.equal(db.job.windowsDone);

    // The pushed summaries are exactly what the plots endpoint serves.
    const page = await analyst.getJson<{ windows: unknown[] }>(`/api/plots/${job.id}/windows`);
    const pushed = [...windowsBefore, ...after.flatMap((m) => (m.type === 'windows' ? m.windows : []))];
    expect(pushed).to.deep.equal(page.windows);
  });
});
