import type { TaskErrorInfo } from '../../worker/ipc-messages.js';

/** A task failed inside its compute child. `permanent` and `aborted` come from the child. */
export class ComputeTaskError extends Error {
  readonly permanent: boolean;
  readonly aborted: boolean;
  constructor(readonly kind: string, info: TaskErrorInfo) {
    super(info.message);
    this.name = info.aborted ? 'AbortError' : info.name === 'Error' ? 'ComputeTaskError' : info.name;
    this.permanent = info.permanent;
    this.aborted = info.aborted;
    if (info.stack) this.stack = info.stack;
  }
}

/** The compute child died mid-task (killed, out of memory, crashed). Transient: retry. */
export class ComputeChildExitedError extends Error {
  readonly permanent = false;
  readonly aborted = false;
  constructor(
    readonly kind: string,
    readonly pid: number,
    readonly exitCode: number | null,
    readonly signal: NodeJS.Signals | null,
  ) {
    super(
      `The compute child (pid ${pid}) running "${kind}" exited ` +
        (signal ? `on signal ${signal}` : `with code ${exitCode}`) +
        (signal === 'SIGKILL' ? ' (killed, perhaps for lack of memory)' : '') +
        '; the attempt counts as failed and will be retried from the last checkpoint.',
    );
    this.name = 'ComputeChildExitedError';
  }
}
