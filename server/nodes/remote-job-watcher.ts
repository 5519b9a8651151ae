import { and, gt, isNull, ne, or } from 'drizzle-orm';
import type { JobState } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import { jobs } from '../db/schema/jobs.js';
import { toJobDto } from '../queue/job-dto.js';
import type { QueueEvents } from './queue-events.js';

/**
 * On PostgreSQL, headless nodes change jobs this server never hears about in-process. This
 * watcher reads the jobs rows touched since its last look (once a second, one indexed query)
 * and publishes them as the same `job:state` / `job:progress` events, so browsers watching
 * this server see remote jobs live too. Rows this server's own node wrote are skipped (it
 * already published them).
 */
export class RemoteJobWatcher {
  private timer?: NodeJS.Timeout;
  private since = new Date(0);
  private readonly lastState = new Map<number, JobState>();
  private busy = false;

  constructor(
    private readonly db: AppDb,
    private readonly events: QueueEvents,
    private readonly ownNodeId: string,
    private readonly everyMs = 1000,
  ) {}

  start(): void {
    // from a little before now: afterwards only the database's own updated_at stamps are compared
    this.since = new Date(Date.now() - 5000);
    this.timer = setInterval(() => void this.poll(), this.everyMs);
    this.timer.unref();
  }

  stop(): void {
    if (this.timer) clearInterval(this.timer);
  }

  private async poll(): Promise<void> {
    if (this.busy) return;
    this.busy = true;
    try {
      const rows = await this.db
        .select()
        .from(jobs)
        .where(and(gt(jobs.updatedAt, this.since), or(isNull(jobs.claimedBy), ne(jobs.claimedBy, this.ownNodeId))))
        .orderBy(jobs.updatedAt)
        .limit(500);
      for (const job of rows) {
        if (job.updatedAt > this.since) this.since = job.updatedAt;
        const previous = this.lastState.get(job.id) ?? null;
        if (previous !== job.state) {
          this.lastState.set(job.id, job.state);
          if (previous !== null || job.claimedBy !== null) {
            this.events.emit('job:state', { jobId: job.id, state: job.state, previousState: previous, job: toJobDto(job) });
          }
        }
        if (job.state === 'running') {
          this.events.emit('job:progress', {
            jobId: job.id,
            ownerId: job.ownerId,
            windowsDone: job.windowsDone,
            totalWindows: job.totalWindows ?? 0,
            checkpointWindow: job.checkpointWindow,
            windowsPerSecond: job.windowsPerSecond,
            etaSeconds: job.etaSeconds,
            nodeId: job.claimedBy,
            at: job.updatedAt.toISOString(),
          });
        }
        if (job.state === 'succeeded' || job.state === 'failed' || job.state === 'cancelled') this.lastState.delete(job.id);
      }
    } catch {
      // the next poll tries again; a database outage shows in the node's own log
    } finally {
      this.busy = false;
    }
  }
}
