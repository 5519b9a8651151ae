import fs from 'node:fs/promises';
import { and, eq, sql } from 'drizzle-orm';
import type { AppContext } from '../context.js';
import { recordings } from '../db/schema/recordings.js';
import type { InspectPayload, InspectResult } from './inspect-task.types.js';

/** Progress is written to the database at most this often per recording. */
const PROGRESS_EVERY_MS = 500;

/**
 * Hands recordings to the compute pool's 'inspect' task (never inspects in the server's event
 * loop) and records the outcome. Recordings left 'inspecting' by a crash are picked up again
 * by resumeAll() at start-up.
 */
export class Inspector {
  private readonly running = new Map<number, AbortController>();
  private readonly settled = new Map<number, Promise<void>>();
  private stopped = false;

  constructor(private readonly ctx: AppContext) {}

  /** Starts inspecting (fire and forget); returns the promise for tests and the demo seeding. */
  enqueue(recordingId: number): Promise<void> {
    const existing = this.settled.get(recordingId);
    if (existing) return existing;
    const p = this.run(recordingId)
      .catch((err: unknown) => {
        this.ctx.logger.error('inspection failed to run', { recordingId, error: err instanceof Error ? err.message : String(err) });
      })
      .finally(() => this.settled.delete(recordingId));
    this.settled.set(recordingId, p);
    return p;
  }

  /** Re-inspects every recording left 'inspecting' (start-up after a crash or a restart). */
  async resumeAll(): Promise<number> {
    const rows = await this.ctx.db.select({ id: recordings.id }).from(recordings).where(eq(recordings.state, 'inspecting'));
    for (const r of rows) void this.enqueue(r.id);
    if (rows.length) this.ctx.logger.info(`re-inspecting ${rows.length} recording(s) left unfinished`);
    return rows.length;
  }

  /** Resolves when every inspection started so far has settled. */
  async idle(): Promise<void> {
    while (this.settled.size) await Promise.all([...this.settled.values()]);
  }

  /** Stops at shutdown: running children are told to stop; their recordings stay 'inspecting'. */
  stop(): void {
    this.stopped = true;
    for (const c of this.running.values()) c.abort();
  }

  private async run(recordingId: number): Promise<void> {
    const { db, compute, logger } = this.ctx;
    const [rec] = await db.select().from(recordings).where(eq(recordings.id, recordingId));
    if (!rec || rec.state !== 'inspecting' || this.stopped) return;
    if (!compute) {
      logger.warn('no compute pool on this node: recording stays inspecting until one starts', { recordingId });
      return;
    }
    try {
      await fs.access(rec.filePath, fs.constants.R_OK);
    } catch {
      await this.finish(recordingId, { state: 'rejected', rejectReasons: [`The data file ${rec.filePath} is missing or unreadable on the server. Upload or register the recording again.`] });
      return;
    }
    const payload: InspectPayload = {
      recordingId,
      filePath: rec.filePath,
      name: rec.name,
      declaredFormat: rec.declaredFormat,
      sidecar: rec.sidecar,
      expectedSha256: rec.expectedSha256,
    };
    const abort = new AbortController();
    this.running.set(recordingId, abort);
    let lastWrite = 0;
    try {
      const result = await compute.run<InspectResult>('inspect', payload, {
        signal: abort.signal,
        onProgress: (p) => {
          const now = Date.now();
          if (now - lastWrite < PROGRESS_EVERY_MS || p.total <= 0) return;
          lastWrite = now;
          void db
            .update(recordings)
            .set({ inspectProgress: Math.min(1, p.done / p.total) })
            .where(and(eq(recordings.id, recordingId), eq(recordings.state, 'inspecting')))
            .catch(() => undefined);
        },
      });
      await this.finish(recordingId, {
        state: result.reasons.length ? 'rejected' : 'ready',
        rejectReasons: result.reasons,
        sha256: result.sha256,
        sizeBytes: result.sizeBytes,
        format: result.format ?? null,
        datatype: result.datatype ?? null,
        channels: result.channels ?? null,
        sampleRate: result.sampleRate ?? null,
        sampleFrames: result.sampleFrames ?? null,
        durationS: result.durationS ?? null,
        qc: result.qc ?? null,
        inspectProgress: 1,
      });
      logger.info(`recording ${recordingId} inspected: ${result.reasons.length ? 'rejected' : 'ready'}`);
    } catch (err) {
      if (abort.signal.aborted || this.stopped) return; // shutting down: resumed at the next start
      await this.finish(recordingId, {
        state: 'rejected',
        rejectReasons: [`Inspection could not finish: ${err instanceof Error ? err.message : String(err)}. Re-inspect it, or upload it again if the file is damaged.`],
      });
    } finally {
      this.running.delete(recordingId);
    }
  }

  private async finish(recordingId: number, set: Partial<typeof recordings.$inferInsert>): Promise<void> {
    await this.ctx.db
      .update(recordings)
      .set({ ...set, updatedAt: sql`now()` })
      .where(and(eq(recordings.id, recordingId), eq(recordings.state, 'inspecting')));
  }
}
