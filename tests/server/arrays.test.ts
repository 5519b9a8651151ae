/**
 * The arrays catalogue: sea-water speed by Mackenzie (1981), presets, validation messages,
 * versioning of arrays a job used, and delete rules.
 */
import { expect } from 'chai';
import type { ArrayRecord } from '../../shared/api/arrays.js';
import { aliasingLimitHz } from '../../shared/api/arrays.js';
import { lineArray } from '../../shared/arrays/array-geometry.js';
import { jobs, users } from '../../server/db/schema/index.js';
import { recordingsPlugin } from '../../server/recordings/recordings-plugin.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

describe('arrays catalogue', function () {
  this.timeout(180_000); // starting a real server with compute children is slow on a busy machine
  let server: TestServer;
  let analyst: TestClient;
  let ops: TestClient;

  before(async () => {
    server = await startTestServer({ env: { DEMO_DATA: 'on' }, plugins: [recordingsPlugin] });
    analyst = await server.signIn('analyst');
    ops = await server.signIn('operations');
  });
  after(() => server.close());

  const geometry = (name: string, count = 4) => lineArray({ name, count, spacingM: 0.5, speedOfSoundMps: 1500 });

  it('derives sea-water speed from temperature, salinity and depth (Mackenzie 1981 check value)', async () => {
    // Mackenzie, K. V. (1981), "Nine-term equation for sound speed in the oceans", JASA 70(3):807–812:
    // the paper's check value is 1550.744 m/s at T = 25 °C, S = 35 ‰, D = 1000 m.
    const res = await analyst.post('/api/arrays', { geometry: geometry('Mooring A'), medium: { kind: 'sea-water-profile', temperatureC: 25, salinityPsu: 35, depthM: 1000 } });
    expect(res.status).to.equal(201);
    const arr = (await res.json()) as ArrayRecord;
    expect(arr.geometry.speedOfSoundMps).to.be.closeTo(1550.744, 0.0005);
    // Same equation at (10 °C, 35 ‰, 0 m): 1489.803 m/s, recomputed from the nine terms.
    const shallow = (await (await analyst.post('/api/arrays', { geometry: geometry('Mooring B'), medium: { kind: 'sea-water-profile', temperatureC: 10, salinityPsu: 35, depthM: 0 } })).json()) as ArrayRecord;
    expect(shallow.geometry.speedOfSoundMps).to.be.closeTo(1489.803, 0.0005);
  });

  it('uses preset speeds and refuses media outside the equation with a clear message', async () => {
    const air = (await (await analyst.post('/api/arrays', { geometry: { ...geometry('Mic bar'), speedOfSoundMps: 1 }, medium: { kind: 'preset', preset: 'air' } })).json()) as ArrayRecord;
    expect(air.geometry.speedOfSoundMps).to.equal(343); // CONVENTIONS.md preset, air at 20 °C
    const hot = await analyst.post('/api/arrays', { geometry: geometry('Hot'), medium: { kind: 'sea-water-profile', temperatureC: 35, salinityPsu: 35, depthM: 10 } });
    expect(hot.status).to.equal(400);
    expect(((await hot.json()) as { error: { message: string } }).error.message).to.match(/above 30 °C is outside Mackenzie/);
    const dup = geometry('Dup');
    dup.elements[2].channel = 1;
    const bad = await analyst.post('/api/arrays', { geometry: dup });
    expect(bad.status).to.equal(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).to.match(/reuses channel 1/);
  });

  it('edits in place while no job used it, and versions it once one has', async () => {
    const arr = (await (await analyst.post('/api/arrays', { geometry: geometry('Tow line'), medium: { kind: 'preset', preset: 'sea-water' }, designFrequencyHz: 1000 })).json()) as ArrayRecord;
    const edited = (await (await analyst.put(`/api/arrays/${arr.id}`, { geometry: { ...geometry('Tow line'), notes: 'recalibrated' }, medium: { kind: 'preset', preset: 'sea-water' } })).json()) as ArrayRecord;
    expect(edited.id).to.equal(arr.id);
    expect(edited.version).to.equal(1);
    const [owner] = await server.ctx.db.select({ id: users.id }).from(users).limit(1);
    await server.ctx.db.insert(jobs).values({ name: 'used it', ownerId: owner.id, params: {}, paramsVersion: 1, arrayId: arr.id });
    const wider = lineArray({ name: 'Tow line', count: 4, spacingM: 0.75, speedOfSoundMps: 1500 });
    const v2 = (await (await analyst.put(`/api/arrays/${arr.id}`, { geometry: wider, medium: { kind: 'preset', preset: 'sea-water' } })).json()) as ArrayRecord;
    expect(v2.id).to.not.equal(arr.id);
    expect(v2.version).to.equal(2);
    expect(v2.lineageId).to.equal(arr.id);
    const old = await analyst.getJson<ArrayRecord>(`/api/arrays/${arr.id}`);
    expect(old.current).to.equal(false);
    expect(old.geometry.elements[1].position[0]).to.equal(0.5); // the job's geometry is kept
    expect(old.jobCount).to.equal(1);
    const history = await analyst.getJson<{ arrays: ArrayRecord[] }>(`/api/arrays/${v2.id}/versions`);
    expect(history.arrays.map((a) => a.version)).to.deep.equal([2, 1]);
    const stale = await analyst.put(`/api/arrays/${arr.id}`, { geometry: wider });
    expect(stale.status).to.equal(409);
    expect(((await stale.json()) as { error: { message: string } }).error.message).to.match(/is history; edit the current version \(v2/);
    const current = await analyst.getJson<{ arrays: ArrayRecord[] }>('/api/arrays');
    expect(current.arrays.filter((a) => a.name === 'Tow line')).to.have.length(1);
    const del = await ops.delete(`/api/arrays/${v2.id}`);
    expect(del.status).to.equal(409);
    expect(((await del.json()) as { error: { message: string } }).error.message).to.match(/used by 1 job/);
  });

  it('deletes an unused array (operations) and reports the aliasing limit c/(2d)', async () => {
    const arr = (await (await analyst.post('/api/arrays', { geometry: geometry('Scratch') })).json()) as ArrayRecord;
    expect((await ops.delete(`/api/arrays/${arr.id}`)).status).to.equal(204);
    expect((await analyst.get(`/api/arrays/${arr.id}`)).status).to.equal(404);
    // DOMAIN.md §5 (common practice, d ≤ λ/2): 1000 Hz for 0.75 m in water, 4287.5 Hz for 4 cm in air.
    expect(aliasingLimitHz(lineArray({ name: 'w', count: 3, spacingM: 0.75, speedOfSoundMps: 1500 }))).to.be.closeTo(1000, 1e-9);
    expect(aliasingLimitHz(lineArray({ name: 'a', count: 3, spacingM: 0.04, speedOfSoundMps: 343 }))).to.be.closeTo(4287.5, 1e-9);
  });
});
