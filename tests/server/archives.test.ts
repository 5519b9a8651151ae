/**
 * Archive roots: admins add them, analysts browse and register files in place (no copy).
 * Escapes are refused with realpath checks (.., absolute paths, symlinks leaving the root),
 * unreadable files are refused, and registered files are inspected in a compute child:
 * a generated file with a clipped and a dead channel gets those flags.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { ArchiveListing, ArchiveRegisterResult, ArchiveRoot, ChannelQc } from '../../shared/api/recordings.js';
import { computePlugin } from '../../server/nodes/compute-plugin.js';
import { recordingsPlugin } from '../../server/recordings/recordings-plugin.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';
import { sha256File, waitInspected, writeWav } from './helpers/upload-fixtures.js';

describe('archive folders', function () {
  this.timeout(180_000); // starting a real server with compute children is slow on a busy machine
  let server: TestServer;
  let admin: TestClient;
  let analyst: TestClient;
  let tmp: string;
  let rootDir: string;
  let root: ArchiveRoot;

  before(async () => {
    tmp = fs.realpathSync(fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-arch-')));
    rootDir = path.join(tmp, 'survey-archive');
    fs.mkdirSync(path.join(rootDir, 'day1', 'deep'), { recursive: true });
    fs.mkdirSync(path.join(tmp, 'private'));
    // Channel 0 clipped (a sine driven past full scale), channel 1 dead (all zero), channel 2 a clean tone with DC.
    await writeWav(path.join(rootDir, 'day1', 'qc-probe.wav'), 3, 8000, 8000, (c, i) =>
      c === 0 ? 1.6 * Math.sin((2 * Math.PI * 250 * i) / 8000) : c === 1 ? 0 : 0.25 * Math.sin((2 * Math.PI * 440 * i) / 8000) + 0.05,
    );
    await writeWav(path.join(rootDir, 'day1', 'deep', 'leg-02.wav'), 2, 8000, 4000, (c, i) => 0.1 * Math.sin(i / (c + 3)));
    await writeWav(path.join(rootDir, 'day1', 'leg-01.wav'), 2, 8000, 4000, (c, i) => 0.1 * Math.cos(i / (c + 3)));
    await writeWav(path.join(tmp, 'private', 'secret.wav'), 2, 8000, 100, () => 0.1);
    fs.symlinkSync(path.join(tmp, 'private', 'secret.wav'), path.join(rootDir, 'day1', 'escape.wav'));
    fs.symlinkSync(path.join(tmp, 'private'), path.join(rootDir, 'outside-dir'));
    fs.symlinkSync(path.join(rootDir, 'day1', 'leg-01.wav'), path.join(rootDir, 'inside-link.wav'));
    fs.writeFileSync(path.join(rootDir, 'day1', 'locked.wav'), 'RIFF');
    fs.chmodSync(path.join(rootDir, 'day1', 'locked.wav'), 0o000);
    server = await startTestServer({ plugins: [computePlugin, recordingsPlugin] });
    admin = await server.signIn('admin');
    analyst = await server.signIn('analyst');
  });
  after(async () => {
    await server.close();
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it('lets only admins add a root, and refuses paths that are not readable folders', async () => {
    const denied = await analyst.post('/api/archives', { name: 'Survey', path: rootDir });
    expect(denied.status).to.equal(403);
    const relative = await admin.post('/api/archives', { name: 'Rel', path: 'survey-archive' });
    expect(relative.status).to.equal(400);
    expect(((await relative.json()) as { error: { message: string } }).error.message).to.match(/not an absolute path/);
    const missing = await admin.post('/api/archives', { name: 'Gone', path: path.join(tmp, 'nope') });
    expect(((await missing.json()) as { error: { message: string } }).error.message).to.match(/There is no folder/);
    const res = await admin.post('/api/archives', { name: 'Survey archive', path: rootDir });
    expect(res.status).to.equal(201);
    root = (await res.json()) as ArchiveRoot;
    expect(root.path).to.equal(rootDir);
    const dup = await admin.post('/api/archives', { name: 'Again', path: rootDir + '/day1/..' });
    expect(dup.status).to.equal(409);
  });

  it('browses a folder and marks links that leave the root', async () => {
    const top = await analyst.getJson<ArchiveListing>(`/api/archives/${root.id}/browse`);
    const names = Object.fromEntries(top.entries.map((e) => [e.name, e]));
    expect(names['day1'].kind).to.equal('folder');
    expect(names['outside-dir'].refused).to.match(/leaves the archive root/);
    const day1 = await analyst.getJson<ArchiveListing>(`/api/archives/${root.id}/browse?path=day1`);
    const escape = day1.entries.find((e) => e.name === 'escape.wav')!;
    expect(escape.refused).to.match(/leaves the archive root/);
    expect(day1.entries.find((e) => e.name === 'qc-probe.wav')!.format).to.equal('wav');
  });

  it('refuses .., absolute paths and symlinks escaping the root, for browse and register', async () => {
    const up = await analyst.get(`/api/archives/${root.id}/browse?path=${encodeURIComponent('../private')}`);
    expect(up.status).to.equal(403);
    const viaLink = await analyst.get(`/api/archives/${root.id}/browse?path=outside-dir`);
    expect(viaLink.status).to.equal(403);
    expect(((await viaLink.json()) as { error: { message: string } }).error.message).to.match(/symbolic link .* outside the archive folder/);
    // root reads any file whatever its mode, so the unreadable case is only checked as another user.
    const asRoot = process.getuid?.() === 0;
    const res = await analyst.post(`/api/archives/${root.id}/register`, {
      paths: ['../private/secret.wav', path.join(tmp, 'private', 'secret.wav'), 'day1/escape.wav', 'outside-dir/secret.wav', ...(asRoot ? [] : ['day1/locked.wav'])],
    });
    const out = (await res.json()) as ArchiveRegisterResult;
    expect(out.registered).to.have.length(0);
    const reasons = Object.fromEntries(out.refused.map((r) => [r.path, r.reason]));
    expect(reasons['../private/secret.wav']).to.match(/outside the archive folder/);
    expect(reasons['day1/escape.wav']).to.match(/symbolic link/);
    expect(reasons['outside-dir/secret.wav']).to.match(/symbolic link/);
    if (!asRoot) expect(reasons['day1/locked.wav']).to.match(/may not read|permissions/);
    // An absolute path is read relative to the root, so it points nowhere inside it.
    expect(reasons[path.join(tmp, 'private', 'secret.wav')]).to.match(/does not exist under the archive folder/);
  });

  it('registers one file in place and inspection flags the clipped and the dead channel', async () => {
    const file = path.join(rootDir, 'day1', 'qc-probe.wav');
    const before = fs.statSync(file).mtimeMs;
    const res = await analyst.post(`/api/archives/${root.id}/register`, { paths: ['day1/qc-probe.wav'] });
    expect(res.status).to.equal(201);
    const out = (await res.json()) as ArchiveRegisterResult;
    expect(out.registered).to.have.length(1);
    const rec = await waitInspected(analyst, out.registered[0].id);
    expect(rec.state).to.equal('ready');
    expect(rec.filePath).to.equal(file); // in place, not copied
    expect(rec.sha256).to.equal(await sha256File(file)); // sha256 computed for registered files
    expect(rec.durationS).to.equal(1);
    const qc = rec.qc as ChannelQc[];
    expect(qc[0].clipped).to.be.greaterThan(1000);
    expect(qc[0].dead).to.equal(false);
    expect(qc[1].dead).to.equal(true);
    expect(qc[1].flat).to.equal(true);
    expect(qc[2].clipped).to.equal(0);
    expect(qc[2].dead).to.equal(false);
    // 0.05 DC within 16-bit quantisation; RMS of 0.25·sin plus 0.05 DC is √(0.25²/2 + 0.05²).
    expect(qc[2].dcOffset).to.be.closeTo(0.05, 1e-3);
    expect(qc[2].rms).to.be.closeTo(Math.sqrt(0.25 ** 2 / 2 + 0.05 ** 2), 1e-3);
    expect(fs.statSync(file).mtimeMs).to.equal(before);
    const again = (await (await analyst.post(`/api/archives/${root.id}/register`, { paths: ['day1/qc-probe.wav'] })).json()) as ArchiveRegisterResult;
    expect(again.refused[0].reason).to.match(/already registered as recording/);
  });

  it('registers a folder by pattern, recursively, skipping links that escape', async () => {
    const res = await analyst.post(`/api/archives/${root.id}/register`, { folder: '', pattern: 'leg-*.wav', recursive: true });
    const out = (await res.json()) as ArchiveRegisterResult;
    expect(out.registered.map((r) => r.path).sort()).to.deep.equal(['day1/deep/leg-02.wav', 'day1/leg-01.wav']);
    const flat = (await (await analyst.post(`/api/archives/${root.id}/register`, { folder: 'day1', pattern: 'e*.wav', recursive: false })).json()) as ArchiveRegisterResult;
    expect(flat.registered).to.have.length(0);
    expect(flat.refused.map((r) => r.path)).to.include('day1/escape.wav');
    for (const r of out.registered) expect((await waitInspected(analyst, r.id)).state).to.equal('ready');
  });

  it('deleting an archive-registered recording never touches its file; the root cannot go while files are registered', async () => {
    const list = await analyst.getJson<{ items: { id: number; name: string }[] }>('/api/recordings?q=leg-01');
    const rec = list.items[0];
    expect((await analyst.delete(`/api/recordings/${rec.id}`)).status).to.equal(204);
    expect(fs.existsSync(path.join(rootDir, 'day1', 'leg-01.wav'))).to.equal(true);
    const rm = await admin.delete(`/api/archives/${root.id}`);
    expect(rm.status).to.equal(409);
    expect(((await rm.json()) as { error: { message: string } }).error.message).to.match(/registered recording/);
  });
});
