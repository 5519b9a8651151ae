/**
 * What a compute task is: a named unit of work a compute child knows how to run. Tasks run in
 * the child process (never in a node's event loop), report progress, and stop between units of
 * work when their signal aborts.
 */
export interface TaskContext {
  /** Aborted when the node asks the task to stop (job cancelled, node shutting down). */
  signal: AbortSignal;
  /** Units done of total; `data` travels to the node (e.g. a checkpoint). Cheap: call it per unit. */
  progress(done: number, total: number, data?: unknown): void;
}

export interface ComputeTask<TPayload = unknown, TResult = unknown> {
  readonly kind: string;
  run(payload: TPayload, ctx: TaskContext): Promise<TResult>;
}

/**
 * A failure that retrying cannot fix (bad file, invalid parameters, missing input). The queue
 * fails the job at once with this message instead of retrying.
 */
export class PermanentTaskError extends Error {
  readonly permanent = true;
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'PermanentTaskError';
  }
}

/** Thrown by a task that stopped because its signal aborted. */
export class TaskAbortedError extends Error {
  constructor(message = 'The task was stopped on request.') {
    super(message);
    this.name = 'AbortError';
  }
}

/** Throws TaskAbortedError if the signal has aborted; call it between units of work. */
export function throwIfAborted(signal: AbortSignal): void {
  if (signal.aborted) throw new TaskAbortedError();
}
