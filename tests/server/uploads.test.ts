/**
 * Chunked, resumable uploads through the real HTTP API of a real server (PGlite, forked compute
 * children for inspection): parallel chunks, corrupted chunks, resume from the server's record,
 * cancel, size / quota refusals, server-side header refusal, whole-file sha256.
 * Reference for the sha256 checks: FIPS 180-4 via node:crypto (common practice).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { UploadSession } from '../../shared/api/uploads.js';
import { computePlugin } from '../../server/nodes/compute-plugin.js';
import type { ServerPlugin } from '../../server/plugins.js';
import { recordingsPlugin } from '../../server/recordings/recordings-plugin.js';
import type { UploadLimits } from '../../server/uploads/upload-limits.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';
import { openSession, sendChunk, sendMissingChunks, sha256File, waitInspected, writeLargeWav, writeWav } from './helpers/upload-fixtures.js';

const MiB = 1024 * 1024;

/** Sets upload limits before the recordings plugin builds its services. */
export const limitsPlugin = (limits: Partial<UploadLimits>): ServerPlugin => ({
  name: 'test-upload-limits',
  start(ctx) {
    ctx.services.uploadLimits = { maxFileBytes: 64 * 1024 * MiB, quotaBytes: 512 * 1024 * MiB, chunkBytes: 8 * MiB, diskReserveBytes: 0, ...limits };
  },
});

describe('uploads API', function () {
  this.timeout(180_000); // starting a real server with compute children is slow on a busy machine
  let server: TestServer;
  let analyst: TestClient;
  let tmp: string;

  before(async () => {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-upl-'));
    server = await startTestServer({ env: { DEMO_DATA: 'on' }, plugins: [computePlugin, limitsPlugin({ maxFileBytes: 100 * MiB, quotaBytes: 150 * MiB }), recordingsPlugin] });
    analyst = await server.signIn('analyst');
  });
  after(async () => {
    await server.close();
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it('takes a 20 MiB WAV in parallel chunks, keeps its sha256 and inspects it to ready', async () => {
    const file = path.join(tmp, 'parallel.wav');
    await writeLargeWav(file, 20 * MiB + 123);
    const size = fs.statSync(file).size;
    const sha256 = await sha256File(file);
    const session = await openSession(analyst, file, { name: 'parallel.wav', sizeBytes: size, format: 'wav', sha256 });
    expect(session.chunkBytes).to.be.within(8 * MiB, 32 * MiB);
    expect(session.chunkCount).to.equal(Math.ceil(size / session.chunkBytes));
    await sendMissingChunks(analyst, session, file, 3);
    const held = await analyst.getJson<UploadSession>(`/api/uploads/${session.id}`);
    expect(held.received).to.deep.equal([0, 1, 2]);
    expect(held.receivedBytes).to.equal(size);
    const done = await analyst.post(`/api/uploads/${session.id}/complete`);
    expect(done.status).to.equal(202);
    const { recordingId } = (await done.json()) as { recordingId: number };
    const rec = await waitInspected(analyst, recordingId);
    expect(rec.state, JSON.stringify(rec.rejectReasons)).to.equal('ready');
    expect(rec.sha256).to.equal(sha256);
    expect(rec.channels).to.equal(16);
    expect(rec.sampleRate).to.equal(48000);
    expect(rec.format).to.equal('wav');
    // The part file became the recording file.
    expect(fs.existsSync(path.join(server.dataDir, 'uploads', `${session.id}.part`))).to.equal(false);
  });

  it('refuses a corrupted chunk, keeps nothing of it, and accepts the chunk sent again', async () => {
    const file = path.join(tmp, 'corrupt.wav');
    await writeLargeWav(file, 9 * MiB);
    const size = fs.statSync(file).size;
    const session = await openSession(analyst, file, { name: 'corrupt.wav', sizeBytes: size, format: 'wav' });
    const bad = await sendChunk(analyst, session, file, 1, { corrupt: true });
    expect(bad.status).to.equal(422);
    const body = (await bad.json()) as { error: { code: string; message: string } };
    expect(body.error.code).to.equal('chunk_checksum_mismatch');
    expect(body.error.message).to.match(/damaged on the way.*send it again/);
    expect((await analyst.getJson<UploadSession>(`/api/uploads/${session.id}`)).received).to.deep.equal([]);
    expect((await sendChunk(analyst, session, file, 1)).status).to.equal(200);
    expect((await sendChunk(analyst, session, file, 0)).status).to.equal(200);
    expect((await analyst.getJson<UploadSession>(`/api/uploads/${session.id}`)).received).to.deep.equal([0, 1]);
  });

  it('resumes from the chunks the server holds and refuses to finish with chunks missing', async () => {
    const file = path.join(tmp, 'resume.wav');
    await writeLargeWav(file, 30 * MiB);
    const size = fs.statSync(file).size;
    const session = await openSession(analyst, file, { name: 'resume.wav', sizeBytes: size, format: 'wav', sha256: await sha256File(file) });
    await sendMissingChunks(analyst, session, file, 2, 2);
    const early = await analyst.post(`/api/uploads/${session.id}/complete`);
    expect(early.status).to.equal(409);
    expect(((await early.json()) as { error: { message: string } }).error.message).to.match(/still lacks 2 of 4 chunks/);
    // A "reloaded page" lists the open sessions and asks which chunks are held.
    const open = await analyst.getJson<{ uploads: UploadSession[] }>('/api/uploads');
    const again = open.uploads.find((u) => u.id === session.id)!;
    expect(again.received).to.have.length(2);
    expect(await sendMissingChunks(analyst, again, file, 2)).to.equal(2);
    const { recordingId } = (await (await analyst.post(`/api/uploads/${session.id}/complete`)).json()) as { recordingId: number };
    expect((await waitInspected(analyst, recordingId)).state).to.equal('ready');
  });

  it('rejects the recording when the whole file differs from the declared sha256', async () => {
    const file = path.join(tmp, 'declared.wav');
    await writeLargeWav(file, 1 * MiB);
    const size = fs.statSync(file).size;
    const session = await openSession(analyst, file, { name: 'declared.wav', sizeBytes: size, format: 'wav', sha256: 'ab'.repeat(32) });
    await sendMissingChunks(analyst, session, file);
    const { recordingId } = (await (await analyst.post(`/api/uploads/${session.id}/complete`)).json()) as { recordingId: number };
    const rec = await waitInspected(analyst, recordingId);
    expect(rec.state).to.equal('rejected');
    expect((rec.rejectReasons as string[]).join(' ')).to.match(/not the abab.* declared when it was uploaded/);
  });

  it('cancel removes the partial file and ends the session', async () => {
    const file = path.join(tmp, 'cancel.wav');
    await writeLargeWav(file, 9 * MiB);
    const session = await openSession(analyst, file, { name: 'cancel.wav', sizeBytes: fs.statSync(file).size, format: 'wav' });
    await sendChunk(analyst, session, file, 0);
    const part = path.join(server.dataDir, 'uploads', `${session.id}.part`);
    expect(fs.existsSync(part)).to.equal(true);
    expect((await analyst.delete(`/api/uploads/${session.id}`)).status).to.equal(204);
    expect(fs.existsSync(part)).to.equal(false);
    const late = await sendChunk(analyst, session, file, 1);
    expect(late.status).to.equal(409);
  });

  it('refuses files over the size limit and over the quota, saying why', async () => {
    // A fresh account, so the earlier tests' recordings do not count against its quota.
    await server.createUser({ email: 'quota@nullsmith.test', password: 'quota-test-password-1', role: 'analyst' });
    const fresh = await server.signIn({ email: 'quota@nullsmith.test', password: 'quota-test-password-1' });
    const tooBig = await fresh.post('/api/uploads', { name: 'huge.wav', sizeBytes: 101 * MiB, format: 'wav' });
    expect(tooBig.status).to.equal(413);
    expect(((await tooBig.json()) as { error: { message: string } }).error.message).to.match(/largest file this server accepts is 100 MiB/);
    // The quota counts recordings and open sessions: 100 MiB open plus 60 MiB more exceed 150 MiB.
    const first = await fresh.post('/api/uploads', { name: 'a.wav', sizeBytes: 100 * MiB, format: 'wav' });
    expect(first.status).to.equal(201);
    const second = await fresh.post('/api/uploads', { name: 'b.wav', sizeBytes: 60 * MiB, format: 'wav' });
    expect(second.status).to.equal(413);
    const msg = ((await second.json()) as { error: { code: string; message: string } }).error;
    expect(msg.code).to.equal('quota_exceeded');
    expect(msg.message).to.match(/quota is 150 MiB; you already use 100 MiB/);
    await fresh.delete(`/api/uploads/${((await first.json()) as UploadSession).id}`);
  });

  it('refuses a bad WAV header on the server at the first chunk, and a bad SigMF side file before any byte', async () => {
    const file = path.join(tmp, 'bad-header.wav');
    await writeWav(file, 2, 8000, 1000, () => 0);
    const bytes = fs.readFileSync(file);
    bytes.writeUInt16LE(0, 22); // nChannels = 0
    fs.writeFileSync(file, bytes);
    const session = await openSession(analyst, file, { name: 'bad-header.wav', sizeBytes: bytes.length, format: 'wav' });
    const res = await sendChunk(analyst, session, file, 0);
    expect(res.status).to.equal(422);
    const err = ((await res.json()) as { error: { code: string; message: string } }).error;
    expect(err.code).to.equal('bad_header');
    expect(err.message).to.match(/0 channels/);
    expect((await analyst.getJson<UploadSession>(`/api/uploads/${session.id}`)).state).to.equal('cancelled');

    const meta = JSON.stringify({ global: { 'core:version': '1.2.0', 'core:datatype': 'ri16_le', 'core:sample_rate': 8000, 'core:num_channels': 4 }, captures: [{ 'core:sample_start': 0 }], annotations: [] });
    const sig = await analyst.post('/api/uploads', { name: 'x.sigmf-data', sizeBytes: 1001, format: 'sigmf', sidecar: meta, sidecarName: 'x.sigmf-meta' });
    expect(sig.status).to.equal(422);
    expect(((await sig.json()) as { error: { message: string } }).error.message).to.match(/1001/);
  });

  it('refuses malformed requests with clear messages', async () => {
    const noName = await analyst.post('/api/uploads', { sizeBytes: 10, format: 'wav' });
    expect(noName.status).to.equal(400);
    const badFormat = await analyst.post('/api/uploads', { name: 'a.flac', sizeBytes: 10, format: 'flac' });
    expect(((await badFormat.json()) as { error: { message: string } }).error.message).to.match(/format must be one of wav, rf64, sigmf, raw/);
    const sigmfWithoutMeta = await analyst.post('/api/uploads', { name: 'a.sigmf-data', sizeBytes: 10, format: 'sigmf' });
    expect(((await sigmfWithoutMeta.json()) as { error: { message: string } }).error.message).to.match(/send its .sigmf-meta/);
    const file = path.join(tmp, 'json-chunk.wav');
    await writeLargeWav(file, 1 * MiB);
    const session = await openSession(analyst, file, { name: 'json-chunk.wav', sizeBytes: fs.statSync(file).size, format: 'wav' });
    const notMultipart = await analyst.post(`/api/uploads/${session.id}/chunks/0`, { data: 'x' });
    expect(notMultipart.status).to.equal(400);
    expect(((await notMultipart.json()) as { error: { message: string } }).error.message).to.match(/multipart\/form-data/);
    const form = new FormData();
    form.append('sha256', '0'.repeat(64));
    form.append('chunk', new Blob([new Uint8Array(16)]), 'chunk');
    const outOfRange = await analyst.fetch(`/api/uploads/${session.id}/chunks/7`, { method: 'POST', body: form });
    expect(outOfRange.status).to.equal(400);
    expect(((await outOfRange.json()) as { error: { message: string } }).error.message).to.match(/outside this upload, which has chunks 0 to 0/);
  });

  it("keeps one user's sessions from another", async () => {
    const file = path.join(tmp, 'private.wav');
    await writeLargeWav(file, 1 * MiB);
    const session = await openSession(analyst, file, { name: 'private.wav', sizeBytes: fs.statSync(file).size, format: 'wav' });
    const ops = await server.signIn('operations');
    expect((await ops.get(`/api/uploads/${session.id}`)).status).to.equal(404);
    expect((await sendChunk(ops, session, file, 0)).status).to.equal(404);
  });
});
