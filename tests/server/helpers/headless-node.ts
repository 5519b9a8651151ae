/**
 * Starts a headless node (`worker/node-main.ts`) as its own process and resolves once it prints
 * its ready line, with everything it printed kept for failure messages.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';

const REPO = path.resolve(import.meta.dirname, '../../..');

export interface HeadlessNode {
  proc: ChildProcess;
  id: string;
  output: () => string;
}

/** `env` is the node's whole environment (DATABASE_URL, DATA_DIR, RESULTS_DIR, timing…). */
export function startHeadlessNode(env: NodeJS.ProcessEnv, name = 'headless', timeoutMs = 60_000): Promise<HeadlessNode> {
  const proc = spawn(process.execPath, ['--import', 'tsx', 'worker/node-main.ts'], { cwd: REPO, env, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  proc.stdout!.on('data', (d: Buffer) => (out += d.toString()));
  proc.stderr!.on('data', (d: Buffer) => (out += d.toString()));
  return new Promise((resolve, reject) => {
    const t = setTimeout(() => reject(new Error(`node ${name} did not start within ${timeoutMs / 1000} s:\n${out}`)), timeoutMs);
    proc.stdout!.on('data', () => {
      const m = /Nullsmith worker (\S+) ready/.exec(out);
      if (m) {
        clearTimeout(t);
        resolve({ proc, id: m[1], output: () => out });
      }
    });
    proc.once('exit', (code) => reject(new Error(`node ${name} exited (${code}) before it was ready:\n${out}`)));
  });
}
