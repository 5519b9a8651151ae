/**
 * Contract of the node's compute pool (implemented in server/nodes/compute-pool.ts).
 * The node (server process, or headless `npm run worker` node) never runs numerics in its
 * own event loop: it forks compute children (worker/compute-main.ts) over IPC, bounded by
 * p-queue (WORKER_CONCURRENCY). Compute children never open the database.
 *
 * A task is a named unit of work a compute child knows (worker/tasks/<kind>.ts), e.g.
 * 'beamform' (a job, driven by the queue) or 'inspect' (recording QC after upload).
 */
export interface ComputeTaskProgress {
  /** Units done and total (windows for beamform, bytes for inspect). */
  done: number;
  total: number;
  /** Free-form task data sent with the progress message (e.g. a checkpoint, a result summary). */
  data?: unknown;
}

export interface ComputeRunOptions {
  onProgress?: (p: ComputeTaskProgress) => void;
  /** Aborting kills nothing abruptly: the child is told to stop between units of work. */
  signal?: AbortSignal;
}

export interface ComputePool {
  /** Runs one task in a compute child; resolves with the task's result or rejects with its error. */
  run<TResult = unknown>(kind: string, payload: unknown, options?: ComputeRunOptions): Promise<TResult>;
  /** Children alive, tasks running and waiting, last heartbeat per child (for GET /api/workers). */
  status(): { children: { pid: number; busy: boolean; task?: string; lastHeartbeatAt: string }[]; running: number; waiting: number };
  close(): Promise<void>;
}
