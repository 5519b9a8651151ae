import { eq, inArray } from 'drizzle-orm';
import WebSocket from 'ws';
import type { SessionUser } from '../../shared/api/auth.js';
import type { JobDto } from '../../shared/api/jobs.js';
import { liveClientMessageSchema, type LiveServerMessage, type LiveTopic } from '../../shared/api/live.js';
import { roleAtLeast } from '../../shared/roles.js';
import { findActiveUser } from '../auth/users.js';
import type { AppContext } from '../context.js';
import { jobs } from '../db/schema/jobs.js';
import { users } from '../db/schema/users.js';
import { jobResultsDir } from '../nodes/beamform-payload.js';
import { toJobDto } from '../queue/job-dto.js';
import { listNodes } from '../queue/list-nodes.js';
import { getQueueStatus } from '../queue/queue-status.js';
import { readWindowSummaries } from '../../worker/results/window-summaries.js';
import type { ChangeBatch } from './change-feed.js';
import { toWindowSummaryDto } from './window-summary-dto.js';

/** Heartbeat age after which a node shows as lost (same as GET /api/workers). */
const NODE_STALE_MS = 15_000;
/** Windows per 'windows' message; a longer backlog goes out in several messages. */
const WINDOWS_PER_MESSAGE = 500;
/** A socket that cannot take this much queued output is cut; its client reconnects and resyncs. */
const MAX_BUFFERED_BYTES = 8 * 1024 * 1024;

interface Subscriber {
  socket: WebSocket;
  user: SessionUser;
  topics: Set<LiveTopic>;
  /** Per watched job: the next window this socket has not been sent. */
  nextWindow: Map<number, number>;
  alive: boolean;
}

/**
 * Everyone watching, what they watch, and the fan-out of change batches to them. The hub
 * reads current state (jobs, nodes, queue, stored windows) once per batch and sends each
 * socket only its topics. All sends are JSON text frames of LiveServerMessage.
 */
export class LiveHub {
  private readonly subscribers = new Set<Subscriber>();
  private lastQueueStatus = '';
  private windowPushes = new Map<number, Promise<void>>();

  constructor(private readonly ctx: AppContext) {}

  get size(): number {
    return this.subscribers.size;
  }

  add(socket: WebSocket, user: SessionUser): void {
    const sub: Subscriber = { socket, user, topics: new Set(), nextWindow: new Map(), alive: true };
    this.subscribers.add(sub);
    socket.on('pong', () => (sub.alive = true));
    socket.on('message', (data, isBinary) => {
      if (isBinary) return this.send(sub, { type: 'refused', message: 'The live channel takes JSON text messages only.' });
      void this.onMessage(sub, data.toString()).catch((e: unknown) => this.ctx.logger.warn('live message failed', { error: String(e) }));
    });
    socket.on('close', () => this.subscribers.delete(sub));
    socket.on('error', () => this.subscribers.delete(sub));
    this.send(sub, { type: 'welcome', userId: user.id, role: user.role, serverTime: new Date().toISOString() });
  }

  /** Pings every socket; one that did not answer the last ping is cut. Re-reads each user (role changes, disabled accounts). */
  async sweep(): Promise<void> {
    for (const sub of this.subscribers) {
      if (!sub.alive) {
        sub.socket.terminate();
        this.subscribers.delete(sub);
        continue;
      }
      sub.alive = false;
      sub.socket.ping();
      const user = await findActiveUser(this.ctx.db, sub.user.id).catch(() => sub.user);
      if (!user) {
        sub.socket.close(4401, 'Your account is no longer active; sign in again.');
        this.subscribers.delete(sub);
      } else {
        sub.user = user;
        if (!roleAtLeast(user.role, 'operations')) sub.topics.delete('nodes');
      }
    }
  }

  closeAll(code: number, reason: string): void {
    for (const sub of this.subscribers) sub.socket.close(code, reason);
    this.subscribers.clear();
  }

  async onBatch(batch: ChangeBatch): Promise<void> {
    if (!this.subscribers.size) return;
    if (batch.jobIds.length) await this.pushJobs(batch.jobIds);
    if (batch.nodeIds.length) await this.pushNodes(batch.nodeIds);
    if (batch.queue || batch.jobIds.length) await this.pushQueue(false);
  }

  private async onMessage(sub: Subscriber, text: string): Promise<void> {
    let raw: unknown;
    try {
      raw = JSON.parse(text);
    } catch {
      return this.send(sub, { type: 'refused', message: 'That message is not JSON; send {"type":"subscribe","topics":["jobs"]}.' });
    }
    const parsed = liveClientMessageSchema.safeParse(raw);
    if (!parsed.success) {
      return this.send(sub, { type: 'refused', message: `Not a live-channel message: ${parsed.error.issues.map((i) => i.message).join('; ')}.` });
    }
    const m = parsed.data;
    if (m.type === 'ping') return this.send(sub, { type: 'pong', sentAt: m.sentAt, serverTime: new Date().toISOString() });
    if (m.type === 'unsubscribe') {
      for (const t of m.topics) {
        sub.topics.delete(t);
        if (t.startsWith('job:')) sub.nextWindow.delete(Number(t.slice(4)));
      }
      return;
    }
    const jobIds: number[] = [];
    for (const t of m.topics) {
      if (t === 'nodes' && !roleAtLeast(sub.user.role, 'operations')) {
        this.send(sub, { type: 'refused', topic: t, message: 'Worker-node health is for the operations role and above.' });
        continue;
      }
      sub.topics.add(t);
      if (t.startsWith('job:')) {
        const id = Number(t.slice(4));
        sub.nextWindow.set(id, m.fromWindow?.[t] ?? 0);
        jobIds.push(id);
      }
    }
    // Bring the new subscriber up to date at once.
    if (jobIds.length) await this.pushJobs(jobIds, sub);
    if (m.topics.includes('queue')) await this.pushQueue(true, sub);
  }

  private send(sub: Subscriber, message: LiveServerMessage): void {
    if (sub.socket.readyState !== WebSocket.OPEN) return;
    if (sub.socket.bufferedAmount > MAX_BUFFERED_BYTES) {
      sub.socket.terminate();
      this.subscribers.delete(sub);
      return;
    }
    sub.socket.send(JSON.stringify(message));
  }

  private async loadJobs(ids: number[]): Promise<JobDto[]> {
    const rows = await this.ctx.db
      .select({ job: jobs, ownerName: users.displayName })
      .from(jobs)
      .innerJoin(users, eq(users.id, jobs.ownerId))
      .where(inArray(jobs.id, ids));
    return rows.map((r) => toJobDto({ ...r.job, ownerName: r.ownerName }));
  }

  private async pushJobs(ids: number[], only?: Subscriber): Promise<void> {
    const targets = only ? [only] : [...this.subscribers];
    const watchers = targets.filter((s) => s.topics.has('jobs') || ids.some((id) => s.topics.has(`job:${id}`)));
    if (!watchers.length) return;
    const list = await this.loadJobs(ids);
    for (const job of list) {
      for (const s of watchers) if (s.topics.has('jobs') || s.topics.has(`job:${job.id}`)) this.send(s, { type: 'job', job });
      await this.pushWindows(job);
    }
  }

  /** New stored windows of a job to the sockets watching it (never past the committed checkpoint). */
  private pushWindows(job: JobDto): Promise<void> {
    // One push per job at a time; a batch arriving meanwhile is covered by the cursors.
    const prev = this.windowPushes.get(job.id) ?? Promise.resolve();
    const next = prev.then(() => this.pushWindowsNow(job)).catch((e: unknown) => {
      this.ctx.logger.warn('live window push failed', { jobId: job.id, error: String(e) });
    });
    this.windowPushes.set(job.id, next);
    void next.finally(() => {
      if (this.windowPushes.get(job.id) === next) this.windowPushes.delete(job.id);
    });
    return next;
  }

  private async pushWindowsNow(job: JobDto): Promise<void> {
    const topic = `job:${job.id}` as LiveTopic;
    const stored = job.checkpointWindow;
    for (;;) {
      const behind = [...this.subscribers].filter((s) => s.topics.has(topic) && (s.nextWindow.get(job.id) ?? 0) < stored);
      if (!behind.length) return;
      const from = Math.min(...behind.map((s) => s.nextWindow.get(job.id) ?? 0));
      const to = Math.min(stored - 1, from + WINDOWS_PER_MESSAGE - 1);
      const { summaries, totalWindows } = await readWindowSummaries(jobResultsDir(this.ctx.config.resultsDir, job.id), { fromWindow: from, toWindow: to });
      const dtos = summaries.map(toWindowSummaryDto);
      for (const s of behind) {
        const mine = dtos.filter((w) => w.window >= (s.nextWindow.get(job.id) ?? 0));
        if (mine.length) this.send(s, { type: 'windows', jobId: job.id, windowsStored: stored, totalWindows, windows: mine });
        s.nextWindow.set(job.id, to + 1);
      }
      if (!summaries.length) return;
    }
  }

  private async pushNodes(ids: string[]): Promise<void> {
    const watchers = [...this.subscribers].filter((s) => s.topics.has('nodes'));
    if (!watchers.length) return;
    const own = this.ctx.services.jobNode?.id;
    const nodes = (await listNodes(this.ctx.db, NODE_STALE_MS)).filter((n) => ids.includes(n.id));
    for (const n of nodes) {
      const node = n.id === own && this.ctx.compute ? { ...n, children: this.ctx.compute.status().children } : n;
      for (const s of watchers) this.send(s, { type: 'node', node });
    }
  }

  private async pushQueue(force: boolean, only?: Subscriber): Promise<void> {
    const watchers = (only ? [only] : [...this.subscribers]).filter((s) => s.topics.has('queue'));
    if (!watchers.length) return;
    const status = await getQueueStatus(this.ctx.db);
    const text = JSON.stringify(status);
    if (!force && text === this.lastQueueStatus) return;
    if (!only) this.lastQueueStatus = text;
    for (const s of watchers) this.send(s, { type: 'queue', status });
  }
}
