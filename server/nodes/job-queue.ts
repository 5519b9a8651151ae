import type { JobState } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import type { JobRow } from '../db/schema/jobs.js';
import type { Actor } from '../queue/actor.js';
import { cancelJob } from '../queue/cancel-job.js';
import { setNodeDraining } from '../queue/drain-node.js';
import { enqueueJob, type EnqueueInput } from '../queue/enqueue-job.js';
import { toJobDto } from '../queue/job-dto.js';
import { setQueuePaused } from '../queue/pause-queue.js';
import { setPriority } from '../queue/set-priority.js';
import type { QueueEvents } from './queue-events.js';

/**
 * What routes call to change the queue: each operation is one SQL operation from
 * server/queue/ followed by the matching in-process event, so the node and the live channel
 * react at once.
 */
export class JobQueue {
  constructor(
    private readonly db: AppDb,
    readonly events: QueueEvents,
  ) {}

  emitState(job: JobRow, previousState: JobState | null): void {
    this.events.emit('job:state', { jobId: job.id, state: job.state, previousState, job: toJobDto(job) });
  }

  async submit(input: EnqueueInput, actor: Actor): Promise<JobRow> {
    const job = await enqueueJob(this.db, input, actor);
    this.emitState(job, null);
    this.events.emit('job:submitted', { jobId: job.id });
    return job;
  }

  async cancel(jobId: number, actor: Actor): Promise<{ job: JobRow; immediate: boolean }> {
    const r = await cancelJob(this.db, jobId, actor);
    if (r.immediate) this.emitState(r.job, null);
    else this.events.emit('job:cancel-requested', { jobId });
    return r;
  }

  async setPriority(jobId: number, priority: number, actor: Actor): Promise<JobRow> {
    const job = await setPriority(this.db, jobId, priority, actor);
    this.emitState(job, job.state);
    return job;
  }

  async setPaused(paused: boolean, actor: Actor): Promise<void> {
    await setQueuePaused(this.db, paused, actor);
    this.events.emit('queue:paused-changed', { paused });
    if (!paused) this.events.emit('job:submitted', { jobId: 0 });
  }

  async setDraining(nodeId: string, draining: boolean, actor: Actor) {
    const node = await setNodeDraining(this.db, nodeId, draining, actor);
    this.events.emit('node:drain-changed', { nodeId, draining });
    return node;
  }
}
