/**
 * The real Nullsmith server as its own process, exactly as an operator starts it
 * (`node --import tsx server/main.ts`), on a free port and a temp DATA_DIR.
 *
 *   const server = await startServerProcess();   // waits for "Nullsmith listening on …"
 *   … server.url …
 *   await server.stop();                         // SIGTERM to that pid, then removes DATA_DIR
 */
import { type ChildProcess, spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', '..');
export const CLIENT_INDEX = path.join(REPO_ROOT, 'dist', 'nullsmith', 'browser', 'index.html');

const LISTENING = /Nullsmith listening on (http:\/\/\S+)/;
const START_TIMEOUT_MS = 60_000;
const STOP_TIMEOUT_MS = 15_000;

export interface ServerProcess {
  url: string;
  dataDir: string;
  pid: number;
  /** Everything the server printed so far (for failure messages). */
  output(): string;
  stop(): Promise<void>;
}

export interface ServerProcessOptions {
  /** Extra environment (e.g. { DEMO_DATA: 'off' }). */
  env?: Record<string, string>;
}

/** Fails early, with the fix, when the client bundle the server serves is missing. */
export function assertClientBuilt(): void {
  if (!fs.existsSync(CLIENT_INDEX)) {
    throw new Error(`The web client is not built (${CLIENT_INDEX} is missing). Run "npm run build:client" first.`);
  }
}

export async function startServerProcess(options: ServerProcessOptions = {}): Promise<ServerProcess> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-e2e-'));
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: REPO_ROOT,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: '0',
      HOST: '127.0.0.1',
      DATA_DIR: dataDir,
      DEMO_DATA: 'on',
      LOG_LEVEL: 'warn',
      WORKER_CONCURRENCY: '1',
      ...options.env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout.on('data', (chunk: Buffer) => (log += chunk.toString()));
  child.stderr.on('data', (chunk: Buffer) => (log += chunk.toString()));

  try {
    const url = await waitForListening(child, () => log);
    return {
      url,
      dataDir,
      pid: child.pid ?? -1,
      output: () => log,
      stop: () => stopChild(child).finally(() => fs.rmSync(dataDir, { recursive: true, force: true })),
    };
  } catch (error) {
    await stopChild(child);
    fs.rmSync(dataDir, { recursive: true, force: true });
    throw error;
  }
}

function waitForListening(child: ChildProcess, log: () => string): Promise<string> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`The server did not say "Nullsmith listening on …" within ${START_TIMEOUT_MS / 1000} s. Output:\n${log()}`)),
      START_TIMEOUT_MS,
    );
    const onData = () => {
      const match = LISTENING.exec(log());
      if (match?.[1]) {
        clearTimeout(timer);
        child.stdout?.off('data', onData);
        resolve(match[1]);
      }
    };
    child.stdout?.on('data', onData);
    child.once('exit', (code, signal) => {
      clearTimeout(timer);
      reject(new Error(`The server exited before listening (code ${code}, signal ${signal}). Output:\n${log()}`));
    });
  });
}

/** SIGTERM (graceful shutdown), then SIGKILL if it hangs; resolves once the pid is gone. */
function stopChild(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const force = setTimeout(() => child.kill('SIGKILL'), STOP_TIMEOUT_MS);
    child.once('exit', () => {
      clearTimeout(force);
      resolve();
    });
    child.kill('SIGTERM');
  });
}
