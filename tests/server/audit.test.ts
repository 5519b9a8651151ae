/**
 * The audit log on a real server: each audited kind of action, done through the HTTP API,
 * appears with who, when and what; filters narrow it; CSV export is RFC 4180.
 */
import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { users } from '../../server/db/schema/index.js';
import { writeWav } from './helpers/upload-fixtures.js';
import { insertReadyRecording, SCENE_ARRAY, sceneParams, writeSceneWav } from './helpers/queue-scene.js';
import { demoAccount, startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

interface Entry {
  id: number;
  at: string;
  actor: string;
  action: string;
  target: string;
  before: unknown;
  after: unknown;
}

describe('audit log', function () {
  this.timeout(240_000);
  let server: TestServer;
  let admin: TestClient;
  let ops: TestClient;
  let analyst: TestClient;
  const started = new Date(Date.now() - 1000).toISOString();

  before(async () => {
    server = await startTestServer();
    admin = await server.signIn('admin');
    ops = await server.signIn('operations');
    analyst = await server.signIn('analyst');
  });
  after(() => server?.close());

  const log = async (query = '') => ((await ops.getJson(`/api/audit?limit=500${query}`)) as { entries: Entry[] }).entries;
  const settle = () => new Promise((r) => setTimeout(r, 300));

  it('records every audited kind of action with who and what', async () => {
    // failed sign-in and sign-in
    expect((await server.client().post('/api/auth/login', { email: 'analyst@demo.nullsmith', password: 'wrong-password' })).status).to.equal(401);
    // role change
    const [a] = await server.ctx.db.select().from(users).where(eq(users.email, demoAccount('analyst').email));
    const other = await server.createUser({ email: 'fulmar@example.org', password: 'fulmar-password-1', role: 'analyst' });
    expect((await admin.patch(`/api/users/${other}`, { role: 'operations' })).status).to.equal(200);
    // upload (open, then cancel = a deletion)
    const up = await analyst.post('/api/uploads', { name: 'audit.wav', sizeBytes: 4096, format: 'wav' });
    const upload = (await up.json()) as { id: string };
    expect((await analyst.delete(`/api/uploads/${upload.id}`)).status).to.equal(204);
    // registration under an archive root
    const root = path.join(server.dataDir, 'archive');
    fs.mkdirSync(root);
    await writeWav(path.join(root, 'shelf.wav'), 2, 8000, 800, (c, i) => 0.1 * Math.sin((c + 1) * i * 0.01));
    const added = await admin.post('/api/archives', { name: 'Shelf archive', path: root });
    expect(added.status).to.equal(201);
    const rootId = ((await added.json()) as { id: number }).id;
    const reg = await analyst.post(`/api/archives/${rootId}/register`, { paths: ['shelf.wav'] });
    expect(reg.status).to.equal(201);
    const shelfId = ((await reg.json()) as { registered: { id: number }[] }).registered[0].id;
    // job submission, reprioritise, cancel, pause/resume
    const recordingId = await insertReadyRecording({ db: server.ctx.db, kind: 'pglite', close: async () => undefined }, await writeSceneWav(server.dataDir, 2), a.id);
    const arr = await analyst.post('/api/arrays', { geometry: SCENE_ARRAY });
    const arrayId = ((await arr.json()) as { id: number }).id;
    expect((await ops.post('/api/queue/pause', {})).status).to.equal(200);
    const sub = await analyst.post('/api/jobs', { name: 'Audit job', recordingId, arrayId, params: sceneParams(8) });
    expect(sub.status, await sub.clone().text()).to.equal(201);
    const jobId = ((await sub.json()) as { job: { id: number } }).job.id;
    expect((await ops.patch(`/api/jobs/${jobId}/priority`, { priority: 5 })).status).to.equal(200);
    expect((await analyst.post(`/api/jobs/${jobId}/cancel`, {})).status).to.equal(200);
    expect((await ops.post('/api/queue/resume', {})).status).to.equal(200);
    // deletion of a recording (one no job used)
    const del = await admin.delete(`/api/recordings/${shelfId}`);
    expect(del.status, await del.clone().text()).to.be.oneOf([200, 204]);
    await settle();

    const entries = await log();
    const has = (action: string, target?: string | RegExp) =>
      entries.find((e) => e.action === action && (target === undefined || (typeof target === 'string' ? e.target === target : target.test(e.target))));
    expect(has('auth.sign-in-failed', 'account:analyst@demo.nullsmith'), 'failed sign-in').to.include({ actor: 'anonymous' });
    expect(has('auth.sign-in', `user:${a.id}`)?.actor, 'sign-in').to.match(/analyst@demo\.nullsmith/);
    expect(has('user.role', `user:${other}`), 'role change').to.deep.include({ before: { role: 'analyst' }, after: { role: 'operations' } });
    expect(has('upload.open', `upload:${upload.id}`), 'upload').to.not.equal(undefined);
    expect(has('upload.cancel', `upload:${upload.id}`), 'upload cancel').to.not.equal(undefined);
    expect(has('archive.add', `archive:${rootId}`), 'archive root').to.not.equal(undefined);
    expect(has('recording.register', `archive:${rootId}`), 'registration').to.not.equal(undefined);
    expect(has('array.create', `array:${arrayId}`), 'array').to.not.equal(undefined);
    expect(has('job.submit', `job:${jobId}`), 'job submission').to.not.equal(undefined);
    expect(has('job.priority', `job:${jobId}`), 'reprioritise').to.deep.include({ after: { priority: 5 } });
    expect(has('job.cancel', `job:${jobId}`), 'cancel').to.not.equal(undefined);
    expect(entries.some((e) => /pause/.test(e.action)), 'pause').to.equal(true);
    expect(has('recording.delete', `recording:${shelfId}`), 'deletion').to.not.equal(undefined);
    for (const e of entries) expect(Date.parse(e.at)).to.be.at.least(Date.parse(started));
  });

  it('filters by action prefix, target, actor and time, newest first, with pages', async () => {
    const jobs = await log('&action=job.');
    expect(jobs.length).to.be.greaterThan(1);
    expect(jobs.every((e) => e.action.startsWith('job.'))).to.equal(true);
    expect(jobs.map((e) => e.id)).to.deep.equal([...jobs.map((e) => e.id)].sort((x, y) => y - x));
    const target = jobs[0].target;
    expect((await log(`&target=${encodeURIComponent(target)}`)).every((e) => e.target === target)).to.equal(true);
    expect((await log('&actor=ops@demo')).every((e) => e.actor.includes('ops@demo'))).to.equal(true);
    expect(await log(`&to=${encodeURIComponent('2000-01-01T00:00:00Z')}`)).to.have.length(0);
    const page1 = (await ops.getJson('/api/audit?limit=2')) as { entries: Entry[]; nextBefore: number };
    const page2 = (await ops.getJson(`/api/audit?limit=2&before=${page1.nextBefore}`)) as { entries: Entry[] };
    expect(page2.entries[0].id).to.be.lessThan(page1.entries[1].id);
    const bad = await ops.get('/api/audit?from=yesterday');
    expect(bad.status).to.equal(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).to.match(/ISO date-time/);
  });

  it('exports the filtered log as RFC 4180 CSV, and analysts may not read it', async () => {
    const res = await ops.get('/api/audit/export.csv?action=user.');
    expect(res.status).to.equal(200);
    expect(res.headers.get('content-type')).to.match(/^text\/csv/);
    const text = await res.text();
    const lines = text.split('\r\n'); // RFC 4180 §2.1: CRLF line breaks
    expect(lines[0]).to.equal('id,at_utc,user_id,actor,action,target,before,after');
    const role = lines.find((l) => l.includes(',user.role,'))!;
    // RFC 4180 §2.6-2.7: fields with commas or quotes are quoted, inner quotes doubled
    expect(role).to.include('"{""role"":""analyst""}"');
    expect((await analyst.get('/api/audit')).status).to.equal(403);
  });
});
