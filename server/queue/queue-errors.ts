import type { JobState } from '../../shared/api/jobs.js';
import { HttpError } from '../http/http-error.js';

/** One factory per refusal, each with a message that says what is wrong and what to do. */
export const jobNotFound = (id: number) =>
  new HttpError(404, 'job_not_found', `Job ${id} does not exist (it may have been deleted); check the id in the jobs list.`);

export const jobNotQueued = (id: number, state: JobState, action: string) =>
  new HttpError(
    409,
    'job_not_waiting',
    `Job ${id} is ${state}: ${action} is only possible while a job is queued or scheduled. ` +
      (state === 'running' ? 'Cancel it and rerun it with the new setting instead.' : 'Rerun it to start a new job.'),
    { state },
  );

export const jobAlreadyFinal = (id: number, state: JobState) =>
  new HttpError(409, 'job_finished', `Job ${id} has already ${state === 'succeeded' ? 'succeeded' : `been ${state}`}; there is nothing to cancel.`, {
    state,
  });
