import crypto from 'node:crypto';
import os from 'node:os';
import type { AppDb } from '../db/client.js';
import type { JobRow } from '../db/schema/jobs.js';
import { acknowledgeCancel } from '../queue/acknowledge-cancel.js';
import { DEFAULT_BACKOFF, type BackoffPolicy } from '../queue/backoff.js';
import { claimJob } from '../queue/claim-job.js';
import { completeJob } from '../queue/complete-job.js';
import { expireForeignLeases } from '../queue/expire-foreign-leases.js';
import { failJob } from '../queue/fail-job.js';
import { getJob } from '../queue/get-job.js';
import { toJobDto } from '../queue/job-dto.js';
import { nodeHeartbeat } from '../queue/node-heartbeat.js';
import { reapExpired } from '../queue/reap-expired.js';
import { registerNode } from '../queue/register-node.js';
import { releaseJob } from '../queue/release-job.js';
import { renewLease } from '../queue/renew-lease.js';
import { stopNode } from '../queue/stop-node.js';
import type { ComputePool } from './compute-pool.types.js';
import type { JobPayloadResolver } from './job-payload.js';
import type { QueueEvents } from './queue-events.js';
import { RateMeter } from './rate-meter.js';

export interface JobNodeOptions {
  db: AppDb;
  pool: ComputePool;
  events: QueueEvents;
  kind: 'server' | 'headless';
  /** Jobs run at once (WORKER_CONCURRENCY); each takes one compute child. */
  concurrency: number;
  /** Payload builders per job kind. */
  payloads: Record<string, JobPayloadResolver>;
  resultsDir: string;
  nodeId?: string;
  /** A lease not renewed for this long is reaped by any node. Default 30 s. */
  leaseMs?: number;
  /** Progress write + lease renewal + cancel check per running job. Default 1 s (progress at least once a second). */
  tickMs?: number;
  /**
   * True only when this node is certainly the only one (the embedded database): jobs left
   * running by a crashed previous process are reaped at start instead of after their lease.
   */
  soleNode?: boolean;
  /** Claim poll when no wake-up arrives (other servers' submits, start-after times). Default 2 s. */
  pollMs?: number;
  heartbeatMs?: number;
  reapMs?: number;
  backoff?: BackoffPolicy;
  log?: (level: 'info' | 'warn' | 'error', message: string) => void;
}

type StopReason = 'cancel' | 'lease-lost' | 'shutdown';

interface RunningJob {
  job: JobRow;
  controller: AbortController;
  stopReason?: StopReason;
  done: number;
  total: number | null;
  /** Windows [0, checkpoint) flushed by the child. */
  checkpoint: number;
  meter: RateMeter;
  finished: Promise<void>;
}

/** Checkpoint data a task may send with progress (beamform: after the window's records are fsynced). */
const checkpointOf = (data: unknown): number | undefined => {
  const c = (data as { checkpointWindow?: unknown } | undefined)?.checkpointWindow;
  return typeof c === 'number' && Number.isInteger(c) ? c : undefined;
};

/**
 * A node: claims jobs, runs each in a compute child, renews leases, writes progress and
 * checkpoints, reaps other nodes' expired leases, honours cancel, pause and drain. The server
 * runs one in the embedded default; `npm run worker` runs one headless on PostgreSQL.
 * All numerics happen in compute children, so this event loop stays free for leases.
 */
export class JobNode {
  readonly id: string;
  private readonly running = new Map<number, RunningJob>();
  private readonly timers: NodeJS.Timeout[] = [];
  private draining = false;
  private stopping = false;
  private filling = false;
  private refill = false;
  private readonly leaseMs: number;
  private readonly backoff: BackoffPolicy;
  private readonly onSubmitted = () => void this.fill();
  private readonly onCancel = ({ jobId }: { jobId: number }) => this.stopJob(jobId, 'cancel');
  private readonly onDrain = ({ nodeId, draining }: { nodeId: string; draining: boolean }) => {
    if (nodeId !== this.id) return;
    this.draining = draining;
    if (!draining) void this.fill();
  };

  constructor(private readonly o: JobNodeOptions) {
    this.id = o.nodeId ?? `${os.hostname()}-${process.pid}-${crypto.randomBytes(2).toString('hex')}`;
    this.leaseMs = o.leaseMs ?? 30_000;
    this.backoff = o.backoff ?? DEFAULT_BACKOFF;
  }

  async start(): Promise<void> {
    await this.register();
    const every = (ms: number, fn: () => Promise<void>) => {
      let busy = false;
      const t = setInterval(() => {
        if (busy || this.stopping) return;
        busy = true;
        fn()
          .catch((e: unknown) => this.o.log?.('warn', `node ${this.id}: ${(e as Error).message}`))
          .finally(() => (busy = false));
      }, ms);
      this.timers.push(t);
    };
    every(this.o.tickMs ?? 1000, () => this.tick());
    every(this.o.pollMs ?? 2000, () => this.fill());
    every(this.o.heartbeatMs ?? 2000, () => this.heartbeat());
    every(this.o.reapMs ?? Math.max(1000, Math.round(this.leaseMs / 3)), () => this.reap());
    this.o.events.on('job:submitted', this.onSubmitted);
    this.o.events.on('job:cancel-requested', this.onCancel);
    this.o.events.on('node:drain-changed', this.onDrain);
    if (this.o.soleNode) {
      const orphans = await expireForeignLeases(this.o.db, this.id);
      if (orphans) this.o.log?.('warn', `${orphans} job(s) were left running by a previous process; returning them to the queue`);
    }
    await this.reap();
    void this.fill();
  }

  /**
   * Stops claiming, asks running jobs' children to stop between windows, returns those jobs to
   * the queue with their checkpoint (attempt refunded), and marks the node stopped.
   */
  async stop(): Promise<void> {
    if (this.stopping) return;
    this.stopping = true;
    for (const t of this.timers) clearInterval(t);
    this.o.events.off('job:submitted', this.onSubmitted);
    this.o.events.off('job:cancel-requested', this.onCancel);
    this.o.events.off('node:drain-changed', this.onDrain);
    for (const id of this.running.keys()) this.stopJob(id, 'shutdown');
    await Promise.allSettled([...this.running.values()].map((r) => r.finished));
    await stopNode(this.o.db, this.id).catch(() => undefined);
  }

  /** Jobs this node runs now. */
  currentJobIds(): number[] {
    return [...this.running.keys()];
  }

  /** Changes how many jobs this node runs at once (admin setting); running jobs above a lower limit finish first. */
  setConcurrency(n: number): void {
    this.o.concurrency = n;
    void this.fill();
  }

  get isDraining(): boolean {
    return this.draining;
  }

  private async register(): Promise<void> {
    await registerNode(this.o.db, { id: this.id, host: os.hostname(), pid: process.pid, kind: this.o.kind, concurrency: this.o.concurrency });
  }

  /** Claims until the slots are full or nothing is claimable. Re-entrant calls coalesce. */
  private async fill(): Promise<void> {
    if (this.filling) {
      this.refill = true;
      return;
    }
    this.filling = true;
    try {
      do {
        this.refill = false;
        while (!this.stopping && !this.draining && this.running.size < this.o.concurrency) {
          const job = await claimJob(this.o.db, this.id, this.leaseMs);
          if (!job) break;
          this.launch(job);
        }
      } while (this.refill && !this.stopping);
    } catch (e) {
      this.o.log?.('warn', `node ${this.id} could not claim: ${(e as Error).message}`);
    } finally {
      this.filling = false;
    }
  }

  private launch(job: JobRow): void {
    const entry: RunningJob = {
      job,
      controller: new AbortController(),
      done: job.checkpointWindow,
      total: job.totalWindows,
      checkpoint: job.checkpointWindow,
      meter: new RateMeter(job.checkpointWindow, Date.now()),
      finished: Promise.resolve(),
    };
    this.running.set(job.id, entry);
    this.o.events.emit('job:state', { jobId: job.id, state: 'running', previousState: null, job: toJobDto(job) });
    entry.finished = this.execute(entry).finally(() => {
      this.running.delete(job.id);
      if (!this.stopping) void this.fill();
    });
  }

  private async execute(entry: RunningJob): Promise<void> {
    const { job } = entry;
    let outcome: { ok: true } | { ok: false; error: Error & { permanent?: boolean; aborted?: boolean } };
    try {
      const resolve = this.o.payloads[job.kind];
      if (!resolve) throw Object.assign(new Error(`This node cannot run "${job.kind}" jobs.`), { permanent: true });
      const payload = await resolve(job, { db: this.o.db, resultsDir: this.o.resultsDir });
      await this.o.pool.run(job.kind, payload, {
        signal: entry.controller.signal,
        onProgress: (p) => {
          entry.done = p.done;
          entry.total = p.total;
          const c = checkpointOf(p.data);
          if (c !== undefined && c > entry.checkpoint) entry.checkpoint = c;
        },
      });
      outcome = { ok: true };
    } catch (e) {
      outcome = { ok: false, error: e instanceof Error ? e : new Error(String(e)) };
    }
    await this.settle(entry, outcome).catch((e: unknown) =>
      this.o.log?.('error', `node ${this.id} could not record the end of job ${job.id}: ${(e as Error).message}; its lease will expire and it will be retried`),
    );
  }

  private async settle(
    entry: RunningJob,
    outcome: { ok: true } | { ok: false; error: Error & { permanent?: boolean; aborted?: boolean } },
  ): Promise<void> {
    const { job } = entry;
    const db = this.o.db;
    if (entry.stopReason === 'lease-lost') {
      this.o.log?.('warn', `node ${this.id} lost the lease of job ${job.id} (reaped after a stall); another node owns it now`);
      return;
    }
    // store the last checkpoint the child reported before deciding anything
    await renewLease(db, job.id, this.id, this.leaseMs, { windowsDone: entry.done, checkpointWindow: entry.checkpoint, ...(entry.total !== null ? { totalWindows: entry.total } : {}) });
    let after: JobRow | undefined;
    if (outcome.ok) {
      after = await completeJob(db, job.id, this.id, entry.total ?? entry.done);
    } else if (entry.stopReason === 'cancel') {
      after = await acknowledgeCancel(db, job.id, this.id, entry.checkpoint);
    } else if (entry.stopReason === 'shutdown') {
      after = await releaseJob(db, job.id, this.id, `node ${this.id} stopped; resumes from window ${entry.checkpoint} on the next node`);
    } else {
      const message = outcome.error.message || String(outcome.error);
      after = await failJob(db, job.id, this.id, { message, permanent: outcome.error.permanent === true }, this.backoff);
      this.o.log?.('warn', `job ${job.id} attempt ${job.attempts} failed${outcome.error.permanent ? ' permanently' : ''}: ${message}`);
    }
    if (after) this.o.events.emit('job:state', { jobId: job.id, state: after.state, previousState: 'running', job: toJobDto(after) });
    else this.o.log?.('warn', `node ${this.id} lost the lease of job ${job.id} before recording its end; the node holding it now decides`);
  }

  private stopJob(jobId: number, reason: StopReason): void {
    const r = this.running.get(jobId);
    if (!r || r.stopReason) return;
    r.stopReason = reason;
    r.controller.abort();
  }

  /** Per running job: renew the lease, store progress, learn about a cancel; publish progress. */
  private async tick(): Promise<void> {
    const now = Date.now();
    await Promise.all(
      [...this.running.values()].map(async (r) => {
        if (r.stopReason) return;
        const rate = r.meter.update(r.done, now);
        const eta = r.total !== null ? r.meter.eta(r.total - r.done) : null;
        const res = await renewLease(this.o.db, r.job.id, this.id, this.leaseMs, {
          windowsDone: r.done,
          ...(r.total !== null ? { totalWindows: r.total } : {}),
          checkpointWindow: r.checkpoint,
          windowsPerSecond: rate,
          etaSeconds: eta,
        });
        if (!res) return this.stopJob(r.job.id, 'lease-lost');
        if (res.cancelRequested) return this.stopJob(r.job.id, 'cancel');
        this.o.events.emit('job:progress', {
          jobId: r.job.id,
          ownerId: r.job.ownerId,
          windowsDone: r.done,
          totalWindows: r.total ?? 0,
          checkpointWindow: r.checkpoint,
          windowsPerSecond: rate,
          etaSeconds: eta,
          nodeId: this.id,
          at: new Date(now).toISOString(),
        });
      }),
    );
  }

  private async heartbeat(): Promise<void> {
    const rate = [...this.running.values()].reduce((s, r) => s + (r.meter.value ?? 0), 0);
    const currentJobIds = this.currentJobIds();
    const hb = await nodeHeartbeat(this.o.db, this.id, { currentJobIds, windowsPerSecond: rate, concurrency: this.o.concurrency });
    if (!hb) return this.register();
    if (hb.draining !== this.draining) this.onDrain({ nodeId: this.id, draining: hb.draining });
    this.o.events.emit('node:heartbeat', {
      nodeId: this.id,
      at: hb.heartbeatAt.toISOString(),
      draining: hb.draining,
      currentJobIds,
      windowsPerSecond: rate,
      children: this.o.pool.status().children,
    });
  }

  private async reap(): Promise<void> {
    const reaped = await reapExpired(this.o.db, this.id, this.backoff);
    for (const r of reaped) {
      this.o.log?.('warn', `job ${r.id}: lease of node ${r.lostNode} expired; now ${r.state}`);
      const job = await getJob(this.o.db, r.id);
      this.o.events.emit('job:state', { jobId: r.id, state: job.state, previousState: 'running', job: toJobDto(job) });
    }
    if (reaped.length) void this.fill();
  }
}
