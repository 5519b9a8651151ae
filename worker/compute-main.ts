/**
 * A compute child: forked by a node (server/nodes/compute-pool.ts), runs one task at a time
 * from worker/tasks/, and talks only over IPC. It never opens the database: the node owns it.
 * When the IPC channel closes (the node died), the child exits instead of running on orphaned.
 */
import type { ChildToNodeMessage, NodeToChildMessage, TaskErrorInfo } from './ipc-messages.js';
import { loadTask } from './tasks/registry.js';

if (!process.send) {
  console.error('worker/compute-main.ts is a compute child: a node forks it with an IPC channel; run `npm run worker` or `npm start` instead.');
  process.exit(2);
}

const send = (m: ChildToNodeMessage): void => {
  if (process.connected) process.send!(m);
};

let current: { taskId: number; controller: AbortController } | undefined;
let stopping = false;

function describeError(e: unknown, aborted: boolean): TaskErrorInfo {
  const err = e instanceof Error ? e : new Error(String(e));
  return {
    name: err.name,
    message: err.message,
    permanent: (err as { permanent?: unknown }).permanent === true,
    aborted: aborted || err.name === 'AbortError',
    stack: err.stack,
  };
}

async function runTask(taskId: number, kind: string, payload: unknown): Promise<void> {
  const controller = new AbortController();
  current = { taskId, controller };
  try {
    const task = await loadTask(kind);
    const result = await task.run(payload, {
      signal: controller.signal,
      progress: (done, total, data) => send({ type: 'progress', taskId, done, total, data }),
    });
    send({ type: 'result', taskId, result });
  } catch (e) {
    send({ type: 'error', taskId, error: describeError(e, controller.signal.aborted) });
  } finally {
    current = undefined;
    if (stopping) process.exit(0);
  }
}

process.on('message', (m: NodeToChildMessage) => {
  switch (m.type) {
    case 'run':
      if (current) {
        send({ type: 'error', taskId: m.taskId, error: { name: 'Busy', message: `compute child ${process.pid} is busy with task ${current.taskId}`, permanent: false, aborted: false } });
        return;
      }
      void runTask(m.taskId, m.kind, m.payload);
      return;
    case 'cancel':
      if (current?.taskId === m.taskId) current.controller.abort();
      return;
    case 'shutdown':
      stopping = true;
      if (!current) process.exit(0);
      current.controller.abort();
      return;
  }
});

process.on('disconnect', () => {
  // The node is gone; its lease will expire and another node resumes from the checkpoint.
  process.exit(0);
});

setInterval(() => send({ type: 'heartbeat', at: Date.now() }), 1000).unref();
send({ type: 'ready', pid: process.pid });
