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
  /** Everything the server printed so far (stdout and stderr), for failure messages. */
  output: () => string;
}

/**
 * Fails with the phase's name and the server's output instead of letting the whole test time
 * out silently, so a slow or stuck step on CI says which step it was.
 */
async function within<T>(ms: number, phase: string, server: () => ServerProcess | undefined, work: Promise<T>): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const deadline = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${phase}: not done after ${ms / 1000} s. Server output:\n${server()?.output().slice(-4000) ?? '(no server)'}`)), ms);
  });
  try {
    return await Promise.race([work, deadline]);
  } finally {
    clearTimeout(timer);
  }
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
    const output = () => `${out}${err ? `\n[stderr]\n${err}` : ''}`;
    proc.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /listening on (http:\/\/\S+)/.exec(out);
      if (m) resolve({ proc, url: m[1], output });
    });
    proc.stderr!.on('data', (d: Buffer) => (err += d.toString()));
    proc.on('exit', (code) => reject(new Error(`server exited (${code}) before listening: ${err}`)));
    setTimeout(() => reject(new Error(`server did not listen within 120 s:\n${output()}`)), 120_000).unref();
  });
}

/**
 * Resolves when the process has ended. A process killed by a signal keeps exitCode null and
 * sets signalCode, and its 'exit' event may already have fired, so both are checked.
 */
function exited(proc: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    if (proc.exitCode !== null || proc.signalCode !== null) resolve();
    else proc.once('exit', () => resolve());
  });
}

function peakRssMiB(pid: number): number {
  const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0);
  return kb / 1024;
}

const signIn = (url: string): Promise<TestClient> => signInDemo(url, 'analyst');

describe(`uploads survive a killed server (${Math.round(SIZE / MiB)} MiB)`, function () {
  this.timeout(HEAVY ? 1_800_000 : 720_000);
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
    const slow = HEAVY ? 10 : 1;
    const srv = () => running;
    await within(120_000 * slow, 'phase 1 (sending until half is acknowledged)', srv, Promise.all([worker(), worker(), worker()]));
    sendingMs += Date.now() - t0;
    log(`phase 1 done, ${acknowledged.size} acknowledged`);
    expect(killed).to.equal(true);
    await within(30_000, 'waiting for the killed server to exit', srv, exited(running!.proc));

    // Phase 2: restart on the same DATA_DIR; the server still knows every acknowledged chunk.
    log('killed');
    running = await startServerProcess(dataDir);
    log('restarted');
    client = await signIn(running.url);
    const resumed = await within(60_000, 'reading the upload session after the restart', srv, client.getJson<UploadSession>(`/api/uploads/${session.id}`));
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
    await within(120_000 * slow, 'phase 2 (sending the missing chunks)', srv, Promise.all([worker2(), worker2(), worker2()]));
    const phase2Ms = Date.now() - t1;
    sendingMs += phase2Ms;
    const phase2Bytes = missing.reduce((s, i) => s + Math.min(session.chunkBytes, size - i * session.chunkBytes), 0);
    const peakAfter = peakRssMiB(running.proc.pid!);

    log('phase 2 done');
    const done = await within(60_000, 'completing the upload', srv, client.post(`/api/uploads/${session.id}/complete`));
    expect(done.status).to.equal(202);
    const { recordingId } = (await done.json()) as { recordingId: number };
    const rec = await within(HEAVY ? 900_000 : 200_000, 'inspecting the uploaded recording', srv, waitInspected(client, recordingId, HEAVY ? 900_000 : 200_000));
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
