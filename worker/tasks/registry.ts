import type { ComputeTask } from './compute-task.js';

/**
 * The tasks a compute child can run, by kind. Loaded lazily, so a child only pays for the
 * code of the tasks it runs. Add one line per task module (worker/tasks/<kind>.ts).
 */
const LOADERS: Record<string, () => Promise<ComputeTask>> = {
  beamform: async () => (await import('./beamform.js')).beamformTask as ComputeTask,
  'file-digest': async () => (await import('./file-digest.js')).fileDigestTask as ComputeTask,
  inspect: async () => (await import('./inspect.js')).inspectTask as ComputeTask,
};

export const TASK_KINDS = (): string[] => Object.keys(LOADERS);

export async function loadTask(kind: string): Promise<ComputeTask> {
  const load = LOADERS[kind];
  if (!load) throw new Error(`No compute task "${kind}"; known tasks: ${TASK_KINDS().join(', ')}.`);
  return load();
}
