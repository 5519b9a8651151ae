/**
 * Batch submission over real HTTP (real server, its node and compute children, PGlite): one job
 * per recording sharing a batch id, all run to success; a bad recording refuses the whole batch
 * by name and stores nothing; archive-folder selection; role and input refusals.
 * All-or-nothing submission of a multi-item request is common practice (one database transaction).
 */
import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import type { CancelBatchResponse, JobBatchDto, SubmitBatchResponse } from '../../shared/api/job-batches.js';
import type { JobDto } from '../../shared/api/jobs.js';
import { archiveRoots } from '../../server/db/schema/archive-roots.js';
import { arrays } from '../../server/db/schema/arrays.js';
import { audit } from '../../server/db/schema/audit.js';
import { jobBatches } from '../../server/db/schema/job-batches.js';
import { jobs } from '../../server/db/schema/jobs.js';
import { recordings } from '../../server/db/schema/recordings.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';

describe('job batches over HTTP', function () {
  this.timeout(240_000);
  let server: TestServer;
  let analyst: TestClient;
  let operations: TestClient;
  let arrayId: number;
  const ids: number[] = [];
  let rejectedId: number;
  let rootId: number;
  const password = 'batch-test-password-1';

  before(async () => {
    server = await startTestServer({ env: { DEMO_DATA: 'off', JOB_POLL_SECONDS: '0.5' } });
    await server.createUser({ email: 'analyst@batch.test', password, role: 'analyst' });
    await server.createUser({ email: 'ops@batch.test', password, role: 'operations' });
    analyst = await server.signIn({ email: 'analyst@batch.test', password });
    operations = await server.signIn({ email: 'ops@batch.test', password });
    const [a] = await server.ctx.db.insert(arrays).values({ lineageId: 0, name: 'batch test line', geometry: SCENE_ARRAY, medium: { kind: 'custom', speedOfSoundMps: 1500 } as never }).returning();
    arrayId = a.id;
    for (const name of ['north-leg.wav', 'east-leg.wav', 'south-leg.wav']) {
      ids.push(await insertReadyRecording({ db: server.ctx.db }, await writeSceneWav(server.dataDir, 2, name), 1));
    }
    const broken = await writeSceneWav(server.dataDir, 2, 'flooded-housing.wav');
    const [r] = await server.ctx.db
      .insert(recordings)
      .values({ name: 'flooded-housing.wav', source: 'upload', filePath: broken, declaredFormat: 'wav', sizeBytes: fs.statSync(broken).size, state: 'rejected', rejectReasons: ['channel 3 is flat'] })
      .returning();
    rejectedId = r.id;

    // An archive root with two files in "leg-a" and one in "leg-a/deep", registered as ready.
    const rootDir = fs.realpathSync(fs.mkdtempSync(path.join(server.dataDir, 'archive-')));
    fs.mkdirSync(path.join(rootDir, 'leg-a', 'deep'), { recursive: true });
    const [root] = await server.ctx.db.insert(archiveRoots).values({ name: 'survey disk', path: rootDir }).returning();
    rootId = root.id;
    for (const rel of ['leg-a/dip-01.wav', 'leg-a/dip-02.wav', 'leg-a/notes-dip.wav', 'leg-a/deep/dip-03.wav']) {
      const file = await writeSceneWav(path.join(rootDir, path.dirname(rel)), 2, path.basename(rel));
      const id = await insertReadyRecording({ db: server.ctx.db }, file, 1);
      await server.ctx.db.update(recordings).set({ source: 'archive', archiveRootId: rootId }).where(eq(recordings.id, id));
    }
  });
  after(async () => server?.close());

  const body = (over: Record<string, unknown> = {}) => ({ name: 'dawn survey', arrayId, params: sceneParams(16), recordingIds: ids, ...over });

  async function waitFinal(id: number): Promise<JobDto> {
    for (let i = 0; i < 1800; i++) {
      const { job } = await analyst.getJson<{ job: JobDto }>(`/api/jobs/${id}`);
      if (['succeeded', 'failed', 'cancelled'].includes(job.state)) return job;
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error(`job ${id} never finished`);
  }

  it('queues one job per recording under one batch id, and all of them succeed', async () => {
    const res = await analyst.post('/api/jobs/batch', body());
    expect(res.status, await res.clone().text()).to.equal(201);
    const out = (await res.json()) as SubmitBatchResponse;
    expect(out.batch.recordingCount).to.equal(3);
    expect(out.jobs.map((j) => j.recordingId)).to.deep.equal(ids);
    expect(out.jobs.every((j) => j.batchId === out.batch.id)).to.equal(true);
    expect(out.jobs[0].name).to.equal('dawn survey · north-leg.wav');
    for (const j of out.jobs) {
      const done = await waitFinal(j.id);
      expect(done.state, String(done.lastError)).to.equal('succeeded');
    }
    // The summed estimate equals the windows the three jobs really ran.
    const finished = await Promise.all(out.jobs.map((j) => analyst.getJson<{ job: JobDto }>(`/api/jobs/${j.id}`)));
    expect(finished.reduce((s, f) => s + f.job.windowsDone, 0)).to.equal(out.estimates.windows);

    const listed = await analyst.getJson<{ items: JobDto[]; total: number }>(`/api/jobs?batch=${out.batch.id}`);
    expect(listed.total).to.equal(3);
    const { batch } = await analyst.getJson<{ batch: JobBatchDto }>(`/api/jobs/batches/${out.batch.id}`);
    expect(batch.counts).to.deep.equal({ succeeded: 3 });
    expect(batch.windowsDone).to.equal(out.estimates.windows);

    const w = await analyst.get(`/api/jobs/${out.jobs[2].id}/weights.csv`);
    expect(w.status).to.equal(200);
    const entries = await server.ctx.db.select().from(audit).where(eq(audit.target, `batch:${out.batch.id}`));
    expect(entries.map((e) => e.action)).to.deep.equal(['job.batch-submit']);
  });

  it('refuses the whole batch naming the bad recording, and stores nothing', async () => {
    const before = (await server.ctx.db.select().from(jobs)).length;
    const batchesBefore = (await server.ctx.db.select().from(jobBatches)).length;
    const res = await analyst.post('/api/jobs/batch', body({ recordingIds: [ids[0], rejectedId, 999_999] }));
    expect(res.status).to.equal(422);
    const { error } = (await res.json()) as { error: { code: string; message: string; details: { recordings: { recordingId: number; recordingName: string | null; code: string }[] } } };
    expect(error.code).to.equal('batch_refused');
    expect(error.message).to.match(/Nothing was queued/).and.match(/flooded-housing\.wav/).and.match(/channel 3 is flat/).and.match(/999999/);
    expect(error.details.recordings.map((r) => [r.recordingId, r.code])).to.deep.equal([
      [rejectedId, 'recording_not_ready'],
      [999_999, 'recording_not_found'],
    ]);
    expect((await server.ctx.db.select().from(jobs)).length).to.equal(before);
    expect((await server.ctx.db.select().from(jobBatches)).length).to.equal(batchesBefore);
  });

  it('explains malformed batches: neither/both selections, duplicates, bad parameters, empty folder', async () => {
    let res = await analyst.post('/api/jobs/batch', body({ recordingIds: undefined }));
    expect(res.status).to.equal(400);
    expect(await res.text()).to.match(/either recordingIds .* or archive/);
    res = await analyst.post('/api/jobs/batch', body({ recordingIds: [ids[0], ids[0]] }));
    expect(res.status).to.equal(400);
    expect(await res.text()).to.match(/more than once/);
    res = await analyst.post('/api/jobs/batch', body({ recordingIds: [] }));
    expect(res.status).to.equal(400);
    expect(await res.text()).to.match(/choose at least one recording/);
    res = await analyst.post('/api/jobs/batch', body({ params: { ...sceneParams(16), nfft: 300 } }));
    expect(res.status).to.equal(400);
    expect(((await res.json()) as { error: { code: string } }).error.code).to.equal('invalid_job');
    res = await analyst.post('/api/jobs/batch', body({ recordingIds: undefined, archive: { rootId, folder: 'leg-a', pattern: '*.flac' } }));
    expect(res.status).to.equal(404);
    expect(await res.text()).to.match(/No ready recording .* matches \*\.flac/);
    res = await analyst.post('/api/jobs/batch', body({ recordingIds: undefined, archive: { rootId, folder: '../..', pattern: '*' } }));
    expect(res.status).to.equal(403);
  });

  it('selects registered recordings by archive folder and pattern, sub-folders only when recursive', async () => {
    const flat = await analyst.post('/api/jobs/batch', body({ name: 'dips', recordingIds: undefined, archive: { rootId, folder: 'leg-a', pattern: 'dip-*.wav' }, runAfter: '2099-01-01T00:00:00Z' }));
    expect(flat.status, await flat.clone().text()).to.equal(201);
    const a = (await flat.json()) as SubmitBatchResponse;
    expect(a.jobs.map((j) => j.name)).to.deep.equal(['dips · dip-01.wav', 'dips · dip-02.wav']);
    expect(a.jobs.every((j) => j.state === 'scheduled')).to.equal(true);
    expect(a.batch).to.include({ folder: 'leg-a', pattern: 'dip-*.wav', recursive: false });
    const deep = await analyst.post('/api/jobs/batch', body({ name: 'dips all', recordingIds: undefined, archive: { rootId, folder: 'leg-a', pattern: 'dip-*.wav', recursive: true }, runAfter: '2099-01-01T00:00:00Z' }));
    expect(deep.status).to.equal(201);
    const b = (await deep.json()) as SubmitBatchResponse;
    expect(b.jobs.map((j) => j.name).sort()).to.deep.equal(['dips all · dip-01.wav', 'dips all · dip-02.wav', 'dips all · dip-03.wav']);
    for (const j of [...a.jobs, ...b.jobs]) await operations.post(`/api/jobs/${j.id}/cancel`, {});
  });

  it('cancels what is left of a batch: only its owner or operations; ended jobs stay as they are, each cancel audited', async () => {
    const made = await analyst.post('/api/jobs/batch', body({ name: 'night leg', runAfter: '2099-01-01T00:00:00Z' }));
    expect(made.status, await made.clone().text()).to.equal(201);
    const { batch, jobs: queued } = (await made.json()) as SubmitBatchResponse;
    // one of the three ends before the batch cancel: it must be left alone
    expect((await analyst.post(`/api/jobs/${queued[0].id}/cancel`, {})).status).to.equal(200);

    await server.createUser({ email: 'other@batch.test', password, role: 'analyst' });
    const other = await server.signIn({ email: 'other@batch.test', password });
    let res = await other.post(`/api/jobs/batches/${batch.id}/cancel`, {});
    expect(res.status).to.equal(403);
    expect(await res.text()).to.match(/only its owner or the operations role/);

    res = await analyst.post(`/api/jobs/batches/${batch.id}/cancel`, {});
    expect(res.status, await res.clone().text()).to.equal(200);
    const answer = (await res.json()) as CancelBatchResponse;
    expect(answer).to.include({ batchId: batch.id, cancelled: 2, stopping: 0, alreadyEnded: 1 });
    expect(answer.message).to.match(/2 queued jobs cancelled; 1 had already ended/);
    for (const j of queued) expect((await analyst.getJson<{ job: JobDto }>(`/api/jobs/${j.id}`)).job.state).to.equal('cancelled');
    const { batch: summed } = await analyst.getJson<{ batch: JobBatchDto }>(`/api/jobs/batches/${batch.id}`);
    expect(summed.counts).to.deep.equal({ cancelled: 3 });
    const entries = await server.ctx.db.select().from(audit).where(eq(audit.action, 'job.cancel'));
    for (const j of queued) expect(entries.filter((e) => e.target === `job:${j.id}`)).to.have.length(1);

    // a second cancel finds nothing left and says so; operations may cancel anyone's batch
    res = await operations.post(`/api/jobs/batches/${batch.id}/cancel`, {});
    expect(res.status).to.equal(200);
    expect(((await res.json()) as CancelBatchResponse).message).to.match(/Nothing to cancel in batch \d+: every one of its 3 jobs has already ended/);
    res = await analyst.post('/api/jobs/batches/424242/cancel', {});
    expect(res.status).to.equal(404);
  });

  it('refuses batches signed out (401), from a read-only API token (403) and without the CSRF header', async () => {
    const anon = server.client();
    let res = await anon.post('/api/jobs/batch', body());
    expect(res.status).to.equal(401);
    res = await anon.get('/api/jobs/batches/1');
    expect(res.status).to.equal(401);
    const made = await analyst.post('/api/tokens', { name: 'batch reader', scope: 'read', expiresInDays: 7 });
    const { secret } = (await made.json()) as { secret: string };
    res = await fetch(new URL('/api/jobs/batch', server.url), { method: 'POST', headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/json' }, body: JSON.stringify(body()) });
    expect(res.status).to.equal(403);
    expect(((await res.json()) as { error: { message: string } }).error.message).to.match(/"read" scope/);
    res = await fetch(new URL('/api/jobs/batches/1', server.url), { headers: { authorization: `Bearer ${secret}` } });
    expect([200, 404]).to.include(res.status);
    res = await analyst.post('/api/jobs/batch', body(), { csrf: false });
    expect(res.status).to.equal(403);
    res = await analyst.get('/api/jobs/batches/424242');
    expect(res.status).to.equal(404);
    res = await analyst.get('/api/jobs/batches/abc');
    expect(res.status).to.equal(400);
  });
});
