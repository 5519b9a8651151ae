/**
 * `npm run load`: a bounded load run against a real Nullsmith server on loopback.
 *
 * 1. Starts `server/main.ts` as its own process on 127.0.0.1 with a temp DATA_DIR (refuses any
 *    other address), uploads an invented tone-comb scene through the chunked upload API, and
 *    registers an 8-element line array.
 * 2. Idle: runs one beamform job alone and times it (the idle real-time factor), then samples
 *    API latency with nothing else going on.
 * 3. Loaded: runs the same job again while 50 WebSocket watchers follow it live, 4 clients
 *    upload recordings in chunks, and 4 clients browse the API; it ends when the job ends.
 * 4. Prints p50/p99 API latency idle and loaded, upload throughput, live messages received,
 *    and the job's real-time factor (recording seconds per wall second) loaded against idle.
 *
 * Everything is bounded: counts (watchers, uploads per client, requests) and a hard time limit
 * after which the run stops the server and exits. Options (all optional):
 *   npm run load -- --watchers 50 --uploaders 4 --upload-mib 48 --scene-seconds 60 --max-minutes 20
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import WebSocket from 'ws';
import type { JobDto } from '../../shared/api/jobs.js';
import type { UploadSession } from '../../shared/api/uploads.js';
import { LIVE_PATH } from '../../shared/api/live.js';
import { SCENE_ARRAY, sceneParams, writeSceneWav } from '../server/helpers/queue-scene.js';
import { signInDemo, TestClient } from '../server/helpers/test-server.js';
import { openSession, sendMissingChunks, sha256File, waitInspected, writeLargeWav } from '../server/helpers/upload-fixtures.js';

const { values: opt } = parseArgs({
  options: {
    watchers: { type: 'string', default: '50' },
    uploaders: { type: 'string', default: '4' },
    'upload-mib': { type: 'string', default: '48' },
    'uploads-each': { type: 'string', default: '3' },
    browsers: { type: 'string', default: '4' },
    'scene-seconds': { type: 'string', default: '60' },
    'max-minutes': { type: 'string', default: '20' },
  },
});
const WATCHERS = Math.min(200, Number(opt.watchers));
const UPLOADERS = Math.min(8, Number(opt.uploaders));
const UPLOAD_MIB = Math.min(512, Number(opt['upload-mib']));
const UPLOADS_EACH = Math.min(10, Number(opt['uploads-each']));
const BROWSERS = Math.min(16, Number(opt.browsers));
const SCENE_SECONDS = Math.min(600, Number(opt['scene-seconds']));
const MAX_MS = Math.min(60, Number(opt['max-minutes'])) * 60_000;
const MAX_REQUESTS = 200_000;
const MiB = 1024 * 1024;
const REPO = path.resolve(import.meta.dirname, '../..');

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-load-'));
let server: ChildProcess | undefined;
/** The server's last log lines, shown when the run fails. */
let serverLog = '';
const sockets: WebSocket[] = [];

function cleanUp(): void {
  for (const ws of sockets) ws.terminate();
  if (server && server.exitCode === null) server.kill('SIGTERM');
  fs.rmSync(tmp, { recursive: true, force: true });
}
const hardStop = setTimeout(() => {
  console.error(`load run: stopped after the ${MAX_MS / 60_000}-minute limit`);
  cleanUp();
  process.exit(2);
}, MAX_MS);
hardStop.unref();

function startServer(): Promise<string> {
  return new Promise((resolve, reject) => {
    server = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
      cwd: REPO,
      env: { PATH: process.env.PATH ?? '', HOME: process.env.HOME ?? '', NODE_ENV: 'production', PORT: '0', HOST: '127.0.0.1', DATA_DIR: path.join(tmp, 'data'), DEMO_DATA: 'on', LOG_LEVEL: 'warn', WORKER_CONCURRENCY: '1', JOB_POLL_SECONDS: '0.5' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    let err = '';
    server.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /listening on (http:\/\/\S+)/.exec(out);
      if (m) resolve(m[1]);
    });
    server.stderr!.on('data', (d: Buffer) => {
      err += d.toString();
      serverLog = (serverLog + d.toString()).slice(-8000);
    });
    server.on('exit', (code) => reject(new Error(`server exited (${code}) before listening: ${err}`)));
  });
}

const percentile = (xs: number[], p: number) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
};
const fmtMs = (x: number) => `${x.toFixed(1)} ms`;

const signIn = (url: string): Promise<TestClient> => signInDemo(url, 'analyst');

async function upload(c: TestClient, file: string, name: string): Promise<number> {
  const size = fs.statSync(file).size;
  const session: UploadSession = await openSession(c, file, { name, sizeBytes: size, format: 'wav', sha256: await sha256File(file) });
  await sendMissingChunks(c, session, file, 3);
  const done = await c.post(`/api/uploads/${session.id}/complete`);
  if (done.status !== 202) throw new Error(`complete: ${done.status} ${await done.text()}`);
  return ((await done.json()) as { recordingId: number }).recordingId;
}

async function runJob(c: TestClient, body: Record<string, unknown>): Promise<JobDto> {
  const res = await c.post('/api/jobs', body);
  if (res.status !== 201) throw new Error(`submit: ${res.status} ${await res.text()}`);
  return ((await res.json()) as { job: JobDto }).job;
}

async function waitJob(c: TestClient, id: number): Promise<JobDto> {
  for (;;) {
    const { job } = await c.getJson<{ job: JobDto }>(`/api/jobs/${id}`);
    if (job.state === 'succeeded' || job.state === 'failed' || job.state === 'cancelled') return job;
    await new Promise((r) => setTimeout(r, 250));
  }
}

const jobWallS = (j: JobDto) => (Date.parse(j.finishedAt!) - Date.parse(j.startedAt!)) / 1000;

/** API browsing as the pages do it; returns latencies until `until()` says stop. */
async function browse(c: TestClient, jobId: number, until: () => boolean, latencies: number[], limit: number): Promise<void> {
  const paths = ['/api/jobs', `/api/jobs/${jobId}`, '/api/recordings', '/api/arrays', '/api/queue', '/api/health'];
  for (let i = 0; !until() && latencies.length < limit; i++) {
    const t0 = performance.now();
    const res = await c.get(paths[i % paths.length]);
    await res.arrayBuffer();
    if (res.status !== 200) throw new Error(`GET ${paths[i % paths.length]}: ${res.status}`);
    latencies.push(performance.now() - t0);
    await new Promise((r) => setTimeout(r, 20));
  }
}

async function main(): Promise<void> {
  console.log(`load run: ${WATCHERS} watchers, ${UPLOADERS} uploaders × ${UPLOADS_EACH} × ${UPLOAD_MIB} MiB, ${BROWSERS} browsing clients, ${SCENE_SECONDS} s scene; limit ${MAX_MS / 60_000} min`);
  const url = await startServer();
  if (new URL(url).hostname !== '127.0.0.1') throw new Error(`refusing to load ${url}: loopback only`);
  const c = await signIn(url);

  // set-up: the scene recording through the real upload API, and its array
  const scene = await writeSceneWav(tmp, SCENE_SECONDS, 'load-scene.wav');
  const recordingId = await upload(c, scene, 'load-scene.wav');
  const rec = await waitInspected(c, recordingId, 300_000);
  if (rec.state !== 'ready') throw new Error(`scene recording is ${rec.state}: ${JSON.stringify(rec)}`);
  const arr = await c.post('/api/arrays', { geometry: { ...SCENE_ARRAY, name: 'load test line' }, medium: { kind: 'custom' } });
  if (arr.status !== 201) throw new Error(`array: ${arr.status} ${await arr.text()}`);
  const arrayId = ((await arr.json()) as { id: number }).id;
  const jobBody = { name: 'load scene', recordingId, arrayId, params: sceneParams(1) };

  // idle: the job alone, then API latency alone
  const idleJob = await waitJob(c, (await runJob(c, { ...jobBody, name: 'idle run' })).id);
  if (idleJob.state !== 'succeeded') throw new Error(`idle job ${idleJob.state}: ${idleJob.lastError}`);
  const idleLatency: number[] = [];
  await browse(c, idleJob.id, () => false, idleLatency, 300);

  // loaded: watchers, uploads and browsing around the same job
  const files: string[] = [];
  for (let u = 0; u < UPLOADERS; u++) {
    const f = path.join(tmp, `upload-${u}.wav`);
    await writeLargeWav(f, UPLOAD_MIB * MiB + u * 4096);
    files.push(f);
  }
  const cookie = [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  const job = await runJob(c, { ...jobBody, name: 'loaded run' });
  let liveMessages = 0;
  let windowsMessages = 0;
  await Promise.all(
    Array.from({ length: WATCHERS }, () =>
      new Promise<void>((resolve, reject) => {
        const ws = new WebSocket(url.replace(/^http/, 'ws') + LIVE_PATH, { headers: { cookie, origin: url } });
        sockets.push(ws);
        ws.once('open', () => {
          ws.send(JSON.stringify({ type: 'subscribe', topics: ['jobs', 'queue', `job:${job.id}`] }));
          resolve();
        });
        ws.on('message', (d: Buffer) => {
          liveMessages++;
          if (d.includes('"windows"')) windowsMessages++;
        });
        ws.once('unexpected-response', (_q, r) => reject(new Error(`watcher refused: ${r.statusCode}`)));
        ws.once('error', reject);
      }),
    ),
  );
  let finished = false;
  const loadedLatency: number[] = [];
  let uploadedBytes = 0;
  const tUp = performance.now();
  let upEnd = tUp;
  const uploaders = files.map(async (f, u) => {
    const uc = await signIn(url);
    for (let k = 0; k < UPLOADS_EACH && !finished; k++) {
      await upload(uc, f, `load-upload-${u}-${k}.wav`);
      uploadedBytes += fs.statSync(f).size;
      upEnd = performance.now();
    }
  });
  const browsers = Array.from({ length: BROWSERS }, async () => browse(await signIn(url), job.id, () => finished, loadedLatency, MAX_REQUESTS));
  const loadedJob = await waitJob(c, job.id);
  finished = true;
  await Promise.all([...browsers, ...uploaders]);
  for (const ws of sockets) ws.close();
  if (loadedJob.state !== 'succeeded') throw new Error(`loaded job ${loadedJob.state}: ${loadedJob.lastError}`);

  const idleS = jobWallS(idleJob);
  const loadedS = jobWallS(loadedJob);
  const upS = (upEnd - tUp) / 1000;
  console.log('');
  console.log('result                                   idle          loaded');
  console.log(`API latency p50                          ${fmtMs(percentile(idleLatency, 50)).padEnd(14)}${fmtMs(percentile(loadedLatency, 50))}`);
  console.log(`API latency p99                          ${fmtMs(percentile(idleLatency, 99)).padEnd(14)}${fmtMs(percentile(loadedLatency, 99))}`);
  console.log(`API requests timed                       ${String(idleLatency.length).padEnd(14)}${loadedLatency.length}`);
  console.log(`job wall time (${SCENE_SECONDS} s of recording)       ${`${idleS.toFixed(1)} s`.padEnd(14)}${loadedS.toFixed(1)} s`);
  console.log(`job real-time factor (rec s / wall s)    ${`${(SCENE_SECONDS / idleS).toFixed(1)}×`.padEnd(14)}${(SCENE_SECONDS / loadedS).toFixed(1)}×  (${((idleS / loadedS) * 100).toFixed(0)} % of idle speed)`);
  console.log(`uploads                                  -             ${(uploadedBytes / MiB).toFixed(0)} MiB in ${upS.toFixed(1)} s = ${(uploadedBytes / MiB / upS).toFixed(1)} MiB/s over ${UPLOADERS} clients`);
  console.log(`live watchers / messages (window msgs)   -             ${WATCHERS} / ${liveMessages} (${windowsMessages})`);
  console.log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? 'CPU'}, load average at end ${os.loadavg().map((x) => x.toFixed(1)).join(' ')}`);
}

main().then(
  () => {
    cleanUp();
    process.exit(0);
  },
  (e: unknown) => {
    console.error('load run failed:', e);
    console.error(`server ${server?.exitCode === null ? 'still running' : `exited with ${server?.exitCode} (${server?.signalCode})`}; its last log lines:\n${serverLog}`);
    cleanUp();
    process.exit(1);
  },
);
