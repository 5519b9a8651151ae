/**
 * A server process killed (SIGKILL) in the middle of an upload loses no chunk it acknowledged,
 * and the upload finishes by resume after a restart on the same DATA_DIR with an identical
 * sha256. CI runs a ~200 MiB file; NULLSMITH_HEAVY=1 runs the 2 GiB check and prints the
 * loopback throughput and the server's peak RSS (VmHWM from /proc, Linux).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { UploadSession } from '../../shared/api/uploads.js';
import { signInDemo, TestClient } from './helpers/test-server.js';
import { openSession, sendChunk, sha256File, waitInspected, writeLargeWav } from './helpers/upload-fixtures.js';

const MiB = 1024 * 1024;
const HEAVY = process.env.NULLSMITH_HEAVY === '1';
const SIZE = HEAVY ? 2 * 1024 * MiB + 4321 : 200 * MiB + 4321;
const ROOT = path.resolve(import.meta.dirname, '../..');

interface ServerProcess {
  proc: ChildProcess;
  url: string;
}

function startServerProcess(dataDir: string): Promise<ServerProcess> {
  return new Promise((resolve, reject) => {
    const proc = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
      cwd: ROOT,
      env: { ...process.env, NODE_ENV: 'test', PORT: '0', HOST: '127.0.0.1', DATA_DIR: dataDir, DEMO_DATA: 'on', LOG_LEVEL: 'warn', WORKER_CONCURRENCY: '1', UPLOAD_CHUNK_BYTES: String(16 * MiB) },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    let err = '';
    proc.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /listening on (http:\/\/\S+)/.exec(out);
      if (m) resolve({ proc, url: m[1] });
    });
    proc.stderr!.on('data', (d: Buffer) => (err += d.toString()));
    proc.on('exit', (code) => reject(new Error(`server exited (${code}) before listening: ${err}`)));
  });
}

function peakRssMiB(pid: number): number {
  const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0);
  return kb / 1024;
}

const signIn = (url: string): Promise<TestClient> => signInDemo(url, 'analyst');

describe(`uploads survive a killed server (${Math.round(SIZE / MiB)} MiB)`, function () {
  this.timeout(HEAVY ? 1_800_000 : 300_000);
  let tmp: string;
  let running: ServerProcess | undefined;

  before(() => {
    tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-kill-'));
  });
  after(() => {
    running?.proc.kill('SIGKILL');
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it('keeps every acknowledged chunk through SIGKILL and finishes by resume with the same sha256', async () => {
    const log = (m: string) => process.env.NULLSMITH_TEST_DEBUG && console.log(`      [${new Date().toISOString()}] ${m}`);
    const file = path.join(tmp, 'survey-long.wav');
    await writeLargeWav(file, SIZE);
    const size = fs.statSync(file).size;
    const sha256 = await sha256File(file);
    const dataDir = path.join(tmp, 'data');

    log('file written');
    running = await startServerProcess(dataDir);
    log('server started');
    let client = await signIn(running.url);
    const session: UploadSession = await openSession(client, file, { name: 'survey-long.wav', sizeBytes: size, format: 'wav', sha256 });
    const acknowledged = new Set<number>();
    let sentBytes = 0;
    let sendingMs = 0;

    // Phase 1: 3 chunks in flight; kill the server once about half are acknowledged.
    const half = Math.floor(session.chunkCount / 2);
    let next = 0;
    const t0 = Date.now();
    let killed = false;
    let peakBeforeKill = 0;
    const worker = async () => {
      while (next < session.chunkCount && !killed) {
        const index = next++;
        try {
          const res = await sendChunk(client, session, file, index);
          if (res.status === 200) {
            acknowledged.add(index);
            sentBytes += Math.min(session.chunkBytes, size - index * session.chunkBytes);
          }
        } catch {
          // the connection died with the server: this chunk was not acknowledged
        }
        if (acknowledged.size >= half && !killed) {
          killed = true;
          peakBeforeKill = peakRssMiB(running!.proc.pid!);
          running!.proc.kill('SIGKILL');
        }
      }
    };
    await Promise.all([worker(), worker(), worker()]);
    sendingMs += Date.now() - t0;
    log(`phase 1 done, ${acknowledged.size} acknowledged`);
    expect(killed).to.equal(true);
    await new Promise((r) => running!.proc.once('exit', r).exitCode !== null && r(undefined));

    // Phase 2: restart on the same DATA_DIR; the server still knows every acknowledged chunk.
    log('killed');
    running = await startServerProcess(dataDir);
    log('restarted');
    client = await signIn(running.url);
    const resumed = await client.getJson<UploadSession>(`/api/uploads/${session.id}`);
    for (const i of acknowledged) expect(resumed.received, `chunk ${i} was acknowledged before the kill`).to.include(i);
    const peakAtRestart = peakRssMiB(running.proc.pid!);
    const t1 = Date.now();
    const missing = Array.from({ length: session.chunkCount }, (_, i) => i).filter((i) => !resumed.received.includes(i));
    let k = 0;
    const worker2 = async () => {
      while (k < missing.length) {
        const index = missing[k++];
        const res = await sendChunk(client, session, file, index);
        expect(res.status, await res.clone().text()).to.equal(200);
        sentBytes += Math.min(session.chunkBytes, size - index * session.chunkBytes);
      }
    };
    await Promise.all([worker2(), worker2(), worker2()]);
    const phase2Ms = Date.now() - t1;
    sendingMs += phase2Ms;
    const phase2Bytes = missing.reduce((s, i) => s + Math.min(session.chunkBytes, size - i * session.chunkBytes), 0);
    const peakAfter = peakRssMiB(running.proc.pid!);

    log('phase 2 done');
    const done = await client.post(`/api/uploads/${session.id}/complete`);
    expect(done.status).to.equal(202);
    const { recordingId } = (await done.json()) as { recordingId: number };
    const rec = await waitInspected(client, recordingId, HEAVY ? 900_000 : 240_000);
    expect(rec.state, JSON.stringify(rec.rejectReasons)).to.equal('ready');
    expect(rec.sha256).to.equal(sha256);
    expect(rec.sizeBytes).to.equal(size);
    const mbps = sentBytes / 1e6 / (sendingMs / 1000);
    console.log(
      `      upload: ${(sentBytes / MiB).toFixed(0)} MiB sent in ${(sendingMs / 1000).toFixed(1)} s = ${mbps.toFixed(0)} MB/s overall on loopback; ` +
        `after the restart ${(phase2Bytes / MiB).toFixed(0)} MiB in ${(phase2Ms / 1000).toFixed(1)} s = ${(phase2Bytes / 1e6 / (phase2Ms / 1000)).toFixed(0)} MB/s. ` +
        `Server peak RSS (VmHWM): ${peakBeforeKill.toFixed(0)} MiB in the first process (includes creating the database), ` +
        `${peakAtRestart.toFixed(0)} MiB after restart before receiving, ${peakAfter.toFixed(0)} MiB after receiving the rest. ` +
        `${acknowledged.size} chunks acknowledged before SIGKILL, ${missing.length} sent after the restart.`,
    );
    running.proc.kill('SIGTERM');
  });
});
