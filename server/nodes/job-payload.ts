import type { AppDb } from '../db/client.js';
import type { JobRow } from '../db/schema/jobs.js';

/**
 * Turns a claimed job into the payload of its compute task (file paths, frozen array,
 * parameters, output folder, resume point). Runs in the node, which owns the database;
 * the compute child gets plain data and never opens the database. Throw an error with
 * `permanent: true` when the job can never run (its recording was deleted, ...).
 */
export type JobPayloadResolver = (job: JobRow, env: { db: AppDb; resultsDir: string }) => Promise<unknown>;

export class PermanentJobError extends Error {
  readonly permanent = true;
  constructor(message: string) {
    super(message);
    this.name = 'PermanentJobError';
  }
}
