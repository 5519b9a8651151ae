/**
 * The queue over real HTTP: a real server (its own node and compute children, PGlite),
 * role enforcement on every queue route, submit with validation, list/filter, detail with
 * history, cancel rules, priority, pause/resume, workers and drain, CSV download.
 */
import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { JobDto } from '../../shared/api/jobs.js';
import type { Role } from '../../shared/roles.js';
import { arrays } from '../../server/db/schema/arrays.js';
import { WEIGHTS_CSV_COLUMNS, SINR_CSV_COLUMNS } from '../../worker/results/csv-streams.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';

describe('queue routes over HTTP', function () {
  this.timeout(180_000);
  let server: TestServer;
  const as: Partial<Record<Role | 'analyst2', TestClient>> = {};
  let recordingId: number;
  let arrayId: number;
  const password = 'queue-test-password-1';

  before(async () => {
    server = await startTestServer({ env: { DEMO_DATA: 'off', JOB_POLL_SECONDS: '0.5' } });
    for (const role of ['analyst', 'operations', 'admin'] as const) {
      await server.createUser({ email: `${role}@queue.test`, password, role });
      as[role] = await server.signIn({ email: `${role}@queue.test`, password });
    }
    await server.createUser({ email: 'analyst2@queue.test', password, role: 'analyst' });
    as.analyst2 = await server.signIn({ email: 'analyst2@queue.test', password });
    const [a] = await server.ctx.db.insert(arrays).values({ lineageId: 0, name: 'queue test line', geometry: SCENE_ARRAY, medium: { kind: 'custom', speedOfSoundMps: 1500 } as never }).returning();
    arrayId = a.id;
    const wav = await writeSceneWav(server.dataDir, 4);
    recordingId = await insertReadyRecording({ db: server.ctx.db }, wav, 1);
  });
  after(async () => server?.close());

  const submitBody = (over: Record<string, unknown> = {}) => ({ name: 'bearing sweep', recordingId, arrayId, params: sceneParams(16), ...over });

  async function waitState(id: number, states: string[]): Promise<JobDto> {
    for (let i = 0; i < 1200; i++) {
      const { job } = await as.analyst!.getJson<{ job: JobDto }>(`/api/jobs/${id}`);
      if (states.includes(job.state)) return job;
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error(`job ${id} never reached ${states.join('/')}`);
  }

  it('refuses every queue route signed out (401) and to a lower role (403)', async () => {
    const routes: [string, string, Role][] = [
      ['GET', '/api/jobs', 'analyst'],
      ['POST', '/api/jobs', 'analyst'],
      ['GET', '/api/jobs/1', 'analyst'],
      ['POST', '/api/jobs/1/cancel', 'analyst'],
      ['PATCH', '/api/jobs/1/priority', 'operations'],
      ['POST', '/api/jobs/1/rerun', 'analyst'],
      ['GET', '/api/jobs/1/weights.csv', 'analyst'],
      ['GET', '/api/jobs/1/sinr.csv', 'analyst'],
      ['GET', '/api/queue', 'analyst'],
      ['POST', '/api/queue/pause', 'operations'],
      ['POST', '/api/queue/resume', 'operations'],
      ['GET', '/api/workers', 'operations'],
      ['POST', '/api/workers/x/drain', 'operations'],
    ];
    const anon = server.client();
    for (const [method, url, role] of routes) {
      const res = await anon.fetch(url, { method, ...(method === 'GET' ? {} : { body: '{}', headers: { 'content-type': 'application/json' } }) });
      expect(res.status, `${method} ${url} signed out`).to.equal(401);
      if (role === 'operations') {
        const r2 = await as.analyst!.fetch(url, { method, ...(method === 'GET' ? {} : { body: '{}', headers: { 'content-type': 'application/json' } }) });
        expect(r2.status, `${method} ${url} as analyst`).to.equal(403);
        expect(((await r2.json()) as { error: { message: string } }).error.message).to.match(/needs the operations role/);
      }
    }
  });

  it('validates a submission and names every problem', async () => {
    let res = await as.analyst!.post('/api/jobs', submitBody({ params: { ...sceneParams(16), nfft: 300 } }));
    expect(res.status).to.equal(400);
    let body = (await res.json()) as { error: { code: string; message: string; details: { problems: { path: string }[] } } };
    expect(body.error.code).to.equal('invalid_job');
    expect(body.error.details.problems.map((p) => p.path)).to.include('params.nfft');

    res = await as.analyst!.post('/api/jobs', submitBody({ params: { ...sceneParams(16), band: { fLoHz: 600, fHiHz: 5000 } } }));
    expect(res.status).to.equal(400);
    body = (await res.json()) as typeof body;
    expect(body.error.message).to.match(/above the Nyquist frequency 4000 Hz/);

    res = await as.analyst!.post('/api/jobs', submitBody({ recordingId: 999_999 }));
    expect(res.status).to.equal(404);
    expect(((await res.json()) as typeof body).error.message).to.match(/recording 999999\) does not exist/);
  });

  it('runs a submitted job on the server node and streams its CSVs', async () => {
    const res = await as.analyst!.post('/api/jobs', submitBody());
    expect(res.status, await res.clone().text()).to.equal(201);
    const { job, estimates } = (await res.json()) as { job: JobDto; estimates: { windows: number; runSeconds: number; outputBytes: number } };
    expect(job.state).to.equal('queued');
    expect(estimates.windows).to.be.greaterThan(5);
    const done = await waitState(job.id, ['succeeded', 'failed']);
    expect(done.state, String(done.lastError)).to.equal('succeeded');
    expect(done.totalWindows).to.equal(estimates.windows);

    const detail = await as.analyst!.getJson<{ events: { to: string }[] }>(`/api/jobs/${job.id}`);
    expect(detail.events.map((e) => e.to)).to.deep.equal(['queued', 'running', 'succeeded']);

    const w = await as.analyst!.get(`/api/jobs/${job.id}/weights.csv`);
    expect(w.status).to.equal(200);
    expect(w.headers.get('content-type')).to.match(/^text\/csv/);
    const wText = await w.text();
    expect(wText.split('\n').find((l) => !l.startsWith('#'))).to.equal(WEIGHTS_CSV_COLUMNS);
    expect(wText).to.match(/^# .*CAUTION/m);
    const s = await as.analyst!.get(`/api/jobs/${job.id}/sinr.csv?fromWindow=1&toWindow=2&comments=off`);
    const sLines = (await s.text()).trim().split('\n');
    expect(sLines[0]).to.equal(SINR_CSV_COLUMNS);
    expect(new Set(sLines.slice(1).map((l) => l.split(',')[0]))).to.deep.equal(new Set(['1', '2']));
    const bad = await as.analyst!.get(`/api/jobs/${job.id}/sinr.csv?beams=a,b`);
    expect(bad.status).to.equal(400);

    const list = await as.analyst!.getJson<{ items: JobDto[]; total: number }>('/api/jobs?state=succeeded&owner=me');
    expect(list.items.map((j) => j.id)).to.include(job.id);
    expect(list.items.every((j) => j.state === 'succeeded')).to.equal(true);
    const badList = await as.analyst!.get('/api/jobs?state=finished');
    expect(badList.status).to.equal(400);

    // priority of a finished job: 409 with what to do
    const p = await as.operations!.patch(`/api/jobs/${job.id}/priority`, { priority: 5 });
    expect(p.status).to.equal(409);
    expect(((await p.json()) as { error: { message: string } }).error.message).to.match(/is succeeded: changing the priority is only possible while a job is queued or scheduled/);

    const rerun = await as.analyst2!.post(`/api/jobs/${job.id}/rerun`, { params: { ...sceneParams(16), snapshotsPerWindow: 24 } });
    expect(rerun.status).to.equal(201);
    const rj = ((await rerun.json()) as { job: JobDto }).job;
    expect(rj).to.include({ rerunOf: job.id, name: 'bearing sweep (rerun)' });
    await waitState(rj.id, ['succeeded', 'failed']);
  });

  it('pause holds new jobs; priority and cancel follow the roles; resume runs them', async () => {
    const pause = await as.operations!.post('/api/queue/pause');
    expect(pause.status).to.equal(200);
    expect(((await pause.json()) as { paused: boolean }).paused).to.equal(true);
    const a = ((await (await as.analyst!.post('/api/jobs', submitBody({ name: 'held a' }))).json()) as { job: JobDto }).job;
    const b = ((await (await as.analyst!.post('/api/jobs', submitBody({ name: 'held b' }))).json()) as { job: JobDto }).job;
    await new Promise((r) => setTimeout(r, 1500)); // several claim polls
    expect((await waitState(a.id, ['queued'])).state).to.equal('queued');

    expect((await as.analyst!.patch(`/api/jobs/${b.id}/priority`, { priority: 9 })).status).to.equal(403);
    const pr = await as.operations!.patch(`/api/jobs/${b.id}/priority`, { priority: 9 });
    expect(pr.status).to.equal(200);
    expect(((await pr.json()) as { job: JobDto }).job.priority).to.equal(9);
    expect((await as.operations!.patch(`/api/jobs/${b.id}/priority`, { priority: 1000 })).status).to.equal(400);

    const other = await as.analyst2!.post(`/api/jobs/${a.id}/cancel`);
    expect(other.status).to.equal(403);
    expect(((await other.json()) as { error: { message: string } }).error.message).to.match(/belongs to someone else/);
    const own = await as.analyst!.post(`/api/jobs/${a.id}/cancel`);
    expect(own.status).to.equal(200);
    expect(((await own.json()) as { job: JobDto }).job.state).to.equal('cancelled');

    const status = await as.analyst!.getJson<{ paused: boolean; counts: Record<string, number> }>('/api/queue');
    expect(status.paused).to.equal(true);
    expect(status.counts.queued).to.equal(1);

    expect((await as.operations!.post('/api/queue/resume')).status).to.equal(200);
    expect((await waitState(b.id, ['succeeded', 'failed'])).state).to.equal('succeeded');
  });

  it('cancels a running job over HTTP (202), keeps its windows and serves them as a partial CSV', async () => {
    const longRec = await insertReadyRecording({ db: server.ctx.db }, await writeSceneWav(server.dataDir, 12, 'long.wav'), 1);
    const res = await as.analyst!.post('/api/jobs', submitBody({ name: 'long sweep', recordingId: longRec, params: sceneParams(1) }));
    const { job } = (await res.json()) as { job: JobDto };
    for (let i = 0; ; i++) {
      const { job: j } = await as.analyst!.getJson<{ job: JobDto }>(`/api/jobs/${job.id}`);
      if (j.state === 'running' && j.windowsDone > 0) break; // the runner reports a checkpoint when it stops
      if (i > 1200 || ['succeeded', 'failed'].includes(j.state)) throw new Error(`job ended ${j.state} before it could be cancelled`);
      await new Promise((r) => setTimeout(r, 50));
    }
    const c = await as.operations!.post(`/api/jobs/${job.id}/cancel`);
    expect(c.status).to.equal(202);
    expect(((await c.json()) as { message: string }).message).to.match(/stops after the window in progress/);
    const done = await waitState(job.id, ['cancelled', 'succeeded', 'failed']);
    expect(done).to.include({ state: 'cancelled', partial: true });
    const w = await as.analyst!.get(`/api/jobs/${job.id}/sinr.csv?comments=off`);
    expect(w.status).to.equal(200);
    expect(w.headers.get('x-nullsmith-partial')).to.equal(`windows 0..${done.checkpointWindow - 1} of ${done.totalWindows}`);
    const windows = new Set((await w.text()).trim().split('\n').slice(1).map((l) => Number(l.split(',')[0])));
    expect(Math.max(...windows)).to.equal(done.checkpointWindow - 1);
    const again = await as.analyst!.post(`/api/jobs/${job.id}/cancel`);
    expect(again.status).to.equal(409);
  });

  it('lists workers with heartbeat age and drains/undrains one (audited)', async () => {
    const { nodes } = await as.operations!.getJson<{ nodes: { id: string; alive: boolean; kind: string; heartbeatAgeS: number; draining: boolean }[] }>('/api/workers');
    const me = nodes.find((n) => n.id === server.ctx.services.jobNode!.id)!;
    expect(me).to.include({ alive: true, kind: 'server', draining: false });
    expect(me.heartbeatAgeS).to.be.below(15);
    const d = await as.operations!.post(`/api/workers/${encodeURIComponent(me.id)}/drain`, { draining: true });
    expect(d.status).to.equal(200);
    expect(server.ctx.services.jobNode!.isDraining).to.equal(true);
    const u = await as.operations!.post(`/api/workers/${encodeURIComponent(me.id)}/drain`, { draining: false });
    expect(u.status).to.equal(200);
    expect(server.ctx.services.jobNode!.isDraining).to.equal(false);
    const missing = await as.operations!.post('/api/workers/no-such-node/drain', {});
    expect(missing.status).to.equal(404);
  });

  it('keeps result files under RESULTS_DIR (DATA_DIR/results by default)', () => {
    expect(fs.existsSync(path.join(server.dataDir, 'results'))).to.equal(true);
  });
});
