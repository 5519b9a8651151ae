/**
 * Recordings: the demo data on first start (inspected to ready in compute children), the
 * table's server-side sort / filter / pages, detail with QC and jobs, array links with the
 * channel-count check, delete rules, and role enforcement on every recordings-family route.
 */
import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import type { RecordingDetail, RecordingListResponse } from '../../shared/api/recordings.js';
import { lineArray } from '../../shared/arrays/array-geometry.js';
import { computePlugin } from '../../server/nodes/compute-plugin.js';
import { recordingsPlugin } from '../../server/recordings/recordings-plugin.js';
import { jobs, recordings } from '../../server/db/schema/index.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';
import { openSession, sendMissingChunks, waitInspected, writeLargeWav } from './helpers/upload-fixtures.js';

describe('recordings', function () {
  this.timeout(180_000); // starting a real server with compute children is slow on a busy machine
  let server: TestServer;
  let analyst: TestClient;
  let ops: TestClient;

  before(async () => {
    server = await startTestServer({ env: { DEMO_DATA: 'on' }, plugins: [computePlugin, recordingsPlugin] });
    analyst = await server.signIn('analyst');
    ops = await server.signIn('operations');
  });
  after(() => server.close());

  it('seeds the demo array and recordings on first start, inspected to ready and linked', async () => {
    const list = await analyst.getJson<RecordingListResponse>('/api/recordings?sort=name&dir=asc');
    expect(list.total).to.equal(3);
    const formats = list.items.map((r) => r.declaredFormat).sort();
    expect(formats).to.deep.equal(['raw', 'sigmf', 'wav']);
    for (const r of list.items) {
      const rec = await waitInspected(analyst, r.id);
      expect(rec.state, JSON.stringify(rec.rejectReasons)).to.equal('ready');
      expect(rec.channels).to.equal(8);
      expect(rec.arrayName).to.match(/Gannet Ledge transit line array \(v1\)/);
      // Copied into DATA_DIR, not read from the repo.
      const row = await server.ctx.db.select().from(recordings);
      expect(row.every((x) => x.filePath.startsWith(server.dataDir))).to.equal(true);
    }
  });

  it('sorts, filters and pages on the server', async () => {
    const file = path.join(server.dataDir, 'extra.wav');
    for (const name of ['alpha-tow.wav', 'bravo-tow.wav']) {
      await writeLargeWav(file, 64 * 1024);
      const s = await openSession(analyst, file, { name, sizeBytes: fs.statSync(file).size, format: 'wav' });
      await sendMissingChunks(analyst, s, file);
      const { recordingId } = (await (await analyst.post(`/api/uploads/${s.id}/complete`)).json()) as { recordingId: number };
      await waitInspected(analyst, recordingId);
    }
    const bySize = await analyst.getJson<RecordingListResponse>('/api/recordings?sort=sizeBytes&dir=asc&pageSize=2&page=0');
    expect(bySize.total).to.equal(5);
    expect(bySize.items).to.have.length(2);
    expect(bySize.items[0].sizeBytes).to.be.at.most(bySize.items[1].sizeBytes);
    const page2 = await analyst.getJson<RecordingListResponse>('/api/recordings?sort=sizeBytes&dir=asc&pageSize=2&page=2');
    expect(page2.items).to.have.length(1);
    const filtered = await analyst.getJson<RecordingListResponse>('/api/recordings?q=tow');
    expect(filtered.items.map((r) => r.name).sort()).to.deep.equal(['alpha-tow.wav', 'bravo-tow.wav']);
    expect(filtered.items[0].uploadedBy).to.be.a('string');
    const bad = await analyst.get('/api/recordings?sort=colour');
    expect(bad.status).to.equal(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).to.match(/sort must be one of/);
  });

  it('links an array only when the channel map fits the recording', async () => {
    const list = await analyst.getJson<RecordingListResponse>('/api/recordings?q=alpha-tow');
    const rec = list.items[0]; // 16 channels
    const big = await analyst.post('/api/arrays', { geometry: lineArray({ name: 'Long tow 24', count: 24, spacingM: 0.75, speedOfSoundMps: 1500 }), medium: { kind: 'preset', preset: 'sea-water' } });
    const bigArr = (await big.json()) as { id: number };
    const refused = await analyst.patch(`/api/recordings/${rec.id}`, { arrayId: bigArr.id });
    expect(refused.status).to.equal(409);
    expect(((await refused.json()) as { error: { message: string } }).error.message).to.match(/needs 24 channels\) but recording alpha-tow.wav has 16/);
    const fits = (await (await analyst.post('/api/arrays', { geometry: lineArray({ name: 'Tow 16', count: 16, spacingM: 0.75, speedOfSoundMps: 1500 }) })).json()) as { id: number };
    const ok = await analyst.patch(`/api/recordings/${rec.id}`, { arrayId: fits.id, name: 'alpha-tow (leg 1).wav' });
    expect(ok.status).to.equal(200);
    const detail = (await ok.json()) as RecordingDetail;
    expect(detail.arrayId).to.equal(fits.id);
    expect(detail.name).to.equal('alpha-tow (leg 1).wav');
    expect(detail.qc).to.have.length(16);
  });

  it('refuses to delete a recording a job used, and deletes an uploaded one with its file', async () => {
    const list = await analyst.getJson<RecordingListResponse>('/api/recordings?q=tow');
    const [used, free] = list.items;
    const [owner] = await server.ctx.db.select({ id: recordings.uploadedBy }).from(recordings).limit(1);
    await server.ctx.db.insert(jobs).values({ name: 'test job', ownerId: owner.id!, params: {}, paramsVersion: 1, recordingId: used.id });
    const refused = await analyst.delete(`/api/recordings/${used.id}`);
    expect(refused.status).to.equal(409);
    expect(((await refused.json()) as { error: { message: string } }).error.message).to.match(/used by 1 job/);
    const detail = await analyst.getJson<RecordingDetail>(`/api/recordings/${used.id}`);
    expect(detail.jobs).to.have.length(1);
    // Below the service, the database refuses too (foreign key, ON DELETE RESTRICT): no race between check and delete.
    const direct = await server.ctx.db.delete(recordings).where(eq(recordings.id, used.id)).then(() => 'deleted', (e: Error) => String(e.cause ?? e));
    expect(direct).to.match(/foreign key/);
    const dir = path.join(server.dataDir, 'recordings', String(free.id));
    expect(fs.existsSync(dir)).to.equal(true);
    expect((await analyst.delete(`/api/recordings/${free.id}`)).status).to.equal(204);
    expect(fs.existsSync(dir)).to.equal(false);
    expect((await analyst.get(`/api/recordings/${free.id}`)).status).to.equal(404);
  });

  it('lets only the uploader or operations and above change someone\'s recording', async () => {
    const demo = (await analyst.getJson<RecordingListResponse>('/api/recordings?q=gannet')).items[0]; // added by the admin account
    const denied = await analyst.patch(`/api/recordings/${demo.id}`, { name: 'mine now' });
    expect(denied.status).to.equal(403);
    const allowed = await ops.patch(`/api/recordings/${demo.id}`, { name: demo.name });
    expect(allowed.status).to.equal(200);
  });

  it('answers 401 on every route when signed out and 403 where the role is too low', async () => {
    const anon = server.client();
    const routes: [string, string][] = [
      ['GET', '/api/recordings'], ['GET', '/api/recordings/1'], ['PATCH', '/api/recordings/1'], ['DELETE', '/api/recordings/1'], ['POST', '/api/recordings/1/inspect'],
      ['GET', '/api/uploads'], ['POST', '/api/uploads'], ['GET', '/api/uploads/x'], ['POST', '/api/uploads/x/chunks/0'], ['POST', '/api/uploads/x/complete'], ['DELETE', '/api/uploads/x'],
      ['GET', '/api/arrays'], ['GET', '/api/arrays/1'], ['GET', '/api/arrays/1/versions'], ['POST', '/api/arrays'], ['PUT', '/api/arrays/1'], ['DELETE', '/api/arrays/1'],
      ['GET', '/api/archives'], ['POST', '/api/archives'], ['DELETE', '/api/archives/1'], ['GET', '/api/archives/1/browse'], ['POST', '/api/archives/1/register'],
    ];
    for (const [method, url] of routes) {
      const res = await anon.fetch(url, { method, headers: { 'content-type': 'application/json' }, body: method === 'GET' || method === 'DELETE' ? undefined : '{}' });
      expect(res.status, `${method} ${url}`).to.equal(401);
    }
    const adminOnly: [string, string][] = [['POST', '/api/archives'], ['DELETE', '/api/archives/1']];
    for (const [method, url] of adminOnly) {
      for (const who of [analyst, ops]) {
        const res = await who.fetch(url, { method, headers: { 'content-type': 'application/json' }, body: method === 'POST' ? '{}' : undefined });
        expect(res.status, `${method} ${url}`).to.equal(403);
      }
    }
    const del = await analyst.delete('/api/arrays/1');
    expect(del.status).to.equal(403);
    expect(((await del.json()) as { error: { message: string } }).error.message).to.match(/operations role or higher/);
  });
});
