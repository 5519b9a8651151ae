import { fork, type ChildProcess } from 'node:child_process';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import PQueue from 'p-queue';
import type { ChildToNodeMessage, NodeToChildMessage } from '../../worker/ipc-messages.js';
import { isChildToNodeMessage } from '../../worker/ipc-messages.js';
import { ComputeChildExitedError, ComputeTaskError } from './compute-errors.js';
import type { ComputePool, ComputeRunOptions } from './compute-pool.types.js';

const COMPUTE_MAIN = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../worker/compute-main.ts');
/** tsx's ESM loader by absolute URL, so a child starts the same whatever the working directory. */
const TSX_LOADER = pathToFileURL(path.join(path.dirname(createRequire(import.meta.url).resolve('tsx/package.json')), 'dist/loader.mjs')).href;

export interface ComputePoolOptions {
  /** Compute children at most (WORKER_CONCURRENCY). */
  concurrency: number;
  /** An idle child exits after this long (memory back to the system). Default 60 s. */
  idleMs?: number;
  /** After a cancel, a child that has not stopped within this long is killed. Default 30 s. */
  cancelGraceMs?: number;
  log?: (level: 'info' | 'warn', message: string) => void;
}

interface Child {
  proc: ChildProcess;
  pid: number;
  busy: boolean;
  task?: string;
  lastHeartbeatAt: number;
  idleTimer?: NodeJS.Timeout;
  /** Set while a task runs: where the child's messages and exit go. */
  onMessage?: (m: ChildToNodeMessage) => void;
  onExit?: (code: number | null, signal: NodeJS.Signals | null) => void;
}

/**
 * Runs tasks in forked compute children (worker/compute-main.ts), at most `concurrency` at
 * once (p-queue), reusing idle children. Numerics never run in the node's event loop, so the
 * node keeps renewing leases and answering HTTP while children compute.
 */
export class ForkedComputePool implements ComputePool {
  private readonly queue: PQueue;
  private readonly children = new Set<Child>();
  private nextTaskId = 1;
  private closed = false;

  constructor(private readonly opts: ComputePoolOptions) {
    this.queue = new PQueue({ concurrency: opts.concurrency });
  }

  run<TResult = unknown>(kind: string, payload: unknown, options: ComputeRunOptions = {}): Promise<TResult> {
    if (this.closed) return Promise.reject(new Error('The compute pool is shut down; the node is stopping.'));
    return this.queue.add(() => this.runOnChild<TResult>(kind, payload, options)) as Promise<TResult>;
  }

  /** Changes how many tasks run at once (admin setting); tasks already running are not stopped. */
  setConcurrency(n: number): void {
    this.queue.concurrency = n;
  }

  status() {
    return {
      children: [...this.children].map((c) => ({
        pid: c.pid,
        busy: c.busy,
        ...(c.task ? { task: c.task } : {}),
        lastHeartbeatAt: new Date(c.lastHeartbeatAt).toISOString(),
      })),
      running: this.queue.pending,
      waiting: this.queue.size,
    };
  }

  /** Pids of children busy with a task (tests use it to kill one). */
  busyPids(): number[] {
    return [...this.children].filter((c) => c.busy).map((c) => c.pid);
  }

  async close(): Promise<void> {
    this.closed = true;
    this.queue.clear();
    await Promise.all(
      [...this.children].map(
        (c) =>
          new Promise<void>((resolve) => {
            if (c.proc.exitCode !== null || c.proc.signalCode !== null) return resolve();
            const kill = setTimeout(() => c.proc.kill('SIGKILL'), this.opts.cancelGraceMs ?? 30_000);
            c.proc.once('exit', () => {
              clearTimeout(kill);
              resolve();
            });
            this.send(c, { type: 'shutdown' });
          }),
      ),
    );
  }

  private async runOnChild<TResult>(kind: string, payload: unknown, options: ComputeRunOptions): Promise<TResult> {
    options.signal?.throwIfAborted();
    const child = await this.acquire(); // comes back marked busy
    const taskId = this.nextTaskId++;
    child.task = kind;
    try {
      return await new Promise<TResult>((resolve, reject) => {
        let killTimer: NodeJS.Timeout | undefined;
        const onAbort = () => {
          this.send(child, { type: 'cancel', taskId });
          killTimer = setTimeout(() => {
            this.opts.log?.('warn', `compute child ${child.pid} ignored a cancel of "${kind}" for ${this.opts.cancelGraceMs ?? 30_000} ms; killing it`);
            child.proc.kill('SIGKILL');
          }, this.opts.cancelGraceMs ?? 30_000);
        };
        const settle = () => {
          options.signal?.removeEventListener('abort', onAbort);
          if (killTimer) clearTimeout(killTimer);
          child.onMessage = undefined;
          child.onExit = undefined;
        };
        child.onMessage = (m) => {
          if (m.type === 'progress' && m.taskId === taskId) options.onProgress?.({ done: m.done, total: m.total, data: m.data });
          else if (m.type === 'result' && m.taskId === taskId) {
            settle();
            resolve(m.result as TResult);
          } else if (m.type === 'error' && m.taskId === taskId) {
            settle();
            reject(new ComputeTaskError(kind, m.error));
          }
        };
        child.onExit = (code, signal) => {
          settle();
          reject(new ComputeChildExitedError(kind, child.pid, code, signal));
        };
        options.signal?.addEventListener('abort', onAbort, { once: true });
        this.send(child, { type: 'run', taskId, kind, payload });
      });
    } finally {
      child.busy = false;
      child.task = undefined;
      this.release(child);
    }
  }

  private send(child: Child, m: NodeToChildMessage): void {
    if (child.proc.connected) child.proc.send(m);
  }

  private async acquire(): Promise<Child> {
    for (const c of this.children) {
      if (!c.busy && c.proc.connected) {
        c.busy = true; // claim it before any await, or two tasks could pick the same idle child
        if (c.idleTimer) clearTimeout(c.idleTimer);
        c.idleTimer = undefined;
        return c;
      }
    }
    return this.spawn();
  }

  private release(child: Child): void {
    if (!this.children.has(child)) return;
    if (this.closed) {
      this.send(child, { type: 'shutdown' });
      return;
    }
    child.idleTimer = setTimeout(() => {
      this.children.delete(child); // retire first, so no task is handed to a child that is exiting
      this.send(child, { type: 'shutdown' });
    }, this.opts.idleMs ?? 60_000);
    child.idleTimer.unref();
  }

  private spawn(): Promise<Child> {
    return new Promise((resolve, reject) => {
      const proc = fork(COMPUTE_MAIN, [], {
        execArgv: ['--import', TSX_LOADER],
        serialization: 'advanced',
        stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
      });
      const child: Child = { proc, pid: proc.pid ?? -1, busy: true, lastHeartbeatAt: Date.now() };
      let ready = false;
      proc.on('message', (m: unknown) => {
        if (!isChildToNodeMessage(m)) return;
        child.lastHeartbeatAt = Date.now();
        if (m.type === 'ready' && !ready) {
          ready = true;
          this.children.add(child);
          resolve(child);
          return;
        }
        child.onMessage?.(m);
      });
      proc.on('exit', (code, signal) => {
        this.children.delete(child);
        if (child.idleTimer) clearTimeout(child.idleTimer);
        if (!ready) reject(new Error(`A compute child failed to start (exit ${signal ?? code}); see the log above for its error.`));
        else child.onExit?.(code, signal);
      });
      proc.on('error', (e) => {
        if (!ready) reject(new Error(`Cannot start a compute child: ${e.message}`));
      });
    });
  }
}
