/**
 * Nullsmith as a real separate process (`node --import tsx server/main.ts`), for tests of
 * start-up, the "listening" line, configuration errors and signal handling.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const REPO = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');
const LISTENING = /^Nullsmith listening on (http:\/\/\S+)$/m;

export interface ServerProcess {
  child: ChildProcess;
  url: string;
  stdout: () => string;
  stderr: () => string;
  /** Sends the signal and resolves with the exit code. */
  stop(signal?: NodeJS.Signals): Promise<number | null>;
}

/** Runs main.ts with exactly these variables (plus PATH/HOME) until it exits. */
export function runServerProcess(env: Record<string, string>, timeoutMs = 120_000): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawnMain(env);
    let stdout = '';
    let stderr = '';
    child.stdout!.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr!.on('data', (d: Buffer) => (stderr += d.toString()));
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`server process did not exit within ${timeoutMs} ms; stderr: ${stderr}`));
    }, timeoutMs);
    child.on('exit', (code) => {
      clearTimeout(timer);
      resolve({ code, stdout, stderr });
    });
  });
}

/** Starts main.ts and resolves once it printed its listening line. */
export function startServerProcess(env: Record<string, string>, timeoutMs = 120_000): Promise<ServerProcess> {
  return new Promise((resolve, reject) => {
    const child = spawnMain(env);
    let stdout = '';
    let stderr = '';
    const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`server did not print its listening line within ${timeoutMs} ms; stderr: ${stderr}`));
    }, timeoutMs);
    child.stderr!.on('data', (d: Buffer) => (stderr += d.toString()));
    child.stdout!.on('data', (d: Buffer) => {
      stdout += d.toString();
      const m = LISTENING.exec(stdout);
      if (m) {
        clearTimeout(timer);
        resolve({
          child,
          url: m[1],
          stdout: () => stdout,
          stderr: () => stderr,
          stop: (signal = 'SIGTERM') => {
            child.kill(signal);
            return exited;
          },
        });
      }
    });
    void exited.then((code) => {
      clearTimeout(timer);
      reject(new Error(`server exited with code ${code} before listening; stderr: ${stderr}`));
    });
  });
}

function spawnMain(env: Record<string, string>): ChildProcess {
  return spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: REPO,
    env: { PATH: process.env.PATH ?? '', HOME: process.env.HOME ?? '', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
}
