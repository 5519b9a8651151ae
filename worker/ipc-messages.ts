/**
 * Every message between a node and its compute children, in one place. Sent over the fork
 * IPC channel with `serialization: 'advanced'` (structured clone: typed arrays, Dates, Maps).
 * A child runs one task at a time; `taskId` ties replies to the request.
 */

/** Node -> child. */
export type NodeToChildMessage =
  /** Start a task of `kind` (a name in worker/tasks/registry.ts). */
  | { type: 'run'; taskId: number; kind: string; payload: unknown }
  /** Stop the running task between units of work; the child replies with an `error` whose `aborted` is true, or its result if it had finished. */
  | { type: 'cancel'; taskId: number }
  /** Finish nothing more and exit. */
  | { type: 'shutdown' };

/** A task's failure, as plain data. */
export interface TaskErrorInfo {
  name: string;
  /** For a person: what went wrong and, where possible, what to do. */
  message: string;
  /** True when retrying cannot help (bad file, invalid parameters): the job fails at once. */
  permanent: boolean;
  /** True when the task stopped because it was cancelled. */
  aborted: boolean;
  stack?: string;
}

/** Child -> node. */
export type ChildToNodeMessage =
  /** Sent once the child has loaded and can take tasks. */
  | { type: 'ready'; pid: number }
  /** Units done of total (windows, bytes). `data` is task specific, e.g. { checkpointWindow } once windows are flushed. */
  | { type: 'progress'; taskId: number; done: number; total: number; data?: unknown }
  | { type: 'result'; taskId: number; result: unknown }
  | { type: 'error'; taskId: number; error: TaskErrorInfo }
  /** Every second while the child's event loop is free (long synchronous numerics delay it). */
  | { type: 'heartbeat'; at: number };

export function isChildToNodeMessage(m: unknown): m is ChildToNodeMessage {
  return typeof m === 'object' && m !== null && typeof (m as { type?: unknown }).type === 'string';
}
