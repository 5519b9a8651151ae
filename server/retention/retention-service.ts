import fs from 'node:fs/promises';
import { and, eq, inArray, isNull, lt } from 'drizzle-orm';
import type { SessionUser } from '../../shared/api/auth.js';
import type { AppContext } from '../context.js';
import { jobPins, jobs, resultPurges, settings } from '../db/schema/index.js';
import { conflict, notFound } from '../http/http-error.js';
import { jobResultsDir } from '../nodes/beamform-payload.js';
import type { Actor } from '../queue/actor.js';
import { writeAudit } from '../queue/write-audit.js';
import { deleteResultFolder } from './result-purge.js';

const DAY_MS = 86_400_000;
const LAST_SWEEP_KEY = 'retention_last_sweep';

export interface SweepReport {
  at: string;
  retentionDays: number;
  /** Jobs whose results were deleted. */
  jobIds: number[];
  bytesReclaimed: number;
  /** Free space on the results disk before and after (statfs), when the platform reports it. */
  freeBytesBefore: number | null;
  freeBytesAfter: number | null;
  /** Jobs old enough but kept because they are pinned. */
  pinnedKept: number;
}

/**
 * Result retention: a finished job's result files are deleted once it ended more than the
 * retention period ago, unless the job is pinned. Run on a schedule by the admin plugin and on
 * demand by an admin. The job row, its history and the audit entry stay, so the catalogue still
 * says what ran and when its results were removed.
 */
export class RetentionService {
  private running?: Promise<SweepReport>;

  constructor(
    private readonly ctx: AppContext,
    private readonly retentionDays: () => number,
  ) {}

  /** One sweep at a time: a second call while one runs gets the same report. */
  sweep(trigger: Actor | 'schedule'): Promise<SweepReport> {
    this.running ??= this.doSweep(trigger).finally(() => (this.running = undefined));
    return this.running;
  }

  private async doSweep(trigger: Actor | 'schedule'): Promise<SweepReport> {
    const { db, config } = this.ctx;
    const days = this.retentionDays();
    const at = new Date();
    const report: SweepReport = { at: at.toISOString(), retentionDays: days, jobIds: [], bytesReclaimed: 0, freeBytesBefore: null, freeBytesAfter: null, pinnedKept: 0 };
    if (days > 0) {
      report.freeBytesBefore = await freeBytes(config.resultsDir);
      const cutoff = new Date(at.getTime() - days * DAY_MS);
      const old = await db
        .select({ id: jobs.id, pinned: jobPins.jobId })
        .from(jobs)
        .leftJoin(jobPins, eq(jobPins.jobId, jobs.id))
        .leftJoin(resultPurges, eq(resultPurges.jobId, jobs.id))
        .where(and(inArray(jobs.state, ['succeeded', 'failed', 'cancelled']), lt(jobs.finishedAt, cutoff), isNull(resultPurges.jobId)));
      const actor: Actor = trigger === 'schedule' ? { kind: 'node', nodeId: 'retention' } : trigger;
      for (const j of old) {
        if (j.pinned !== null) {
          report.pinnedKept++;
          continue;
        }
        const bytes = await deleteResultFolder(jobResultsDir(config.resultsDir, j.id));
        const reason = trigger === 'schedule' ? 'scheduled' : `on demand by user:${trigger.kind === 'user' ? trigger.userId : '?'}`;
        await db.insert(resultPurges).values({ jobId: j.id, bytesReclaimed: bytes, reason }).onConflictDoNothing();
        await writeAudit(db, { actor, action: 'results.delete', target: `job:${j.id}`, after: { bytesReclaimed: bytes, retentionDays: days, reason } });
        report.jobIds.push(j.id);
        report.bytesReclaimed += bytes;
      }
      report.freeBytesAfter = await freeBytes(config.resultsDir);
    }
    await db
      .insert(settings)
      .values({ key: LAST_SWEEP_KEY, value: report })
      .onConflictDoUpdate({ target: settings.key, set: { value: report, updatedAt: new Date() } });
    if (report.jobIds.length) this.ctx.logger.info(`retention: deleted the results of ${report.jobIds.length} job(s), ${report.bytesReclaimed} bytes`);
    return report;
  }

  async lastSweep(): Promise<SweepReport | undefined> {
    const [row] = await this.ctx.db.select({ value: settings.value }).from(settings).where(eq(settings.key, LAST_SWEEP_KEY));
    return row?.value as SweepReport | undefined;
  }

  async pin(user: SessionUser, jobId: number, note: string): Promise<void> {
    const [job] = await this.ctx.db.select({ id: jobs.id }).from(jobs).where(eq(jobs.id, jobId));
    if (!job) throw notFound(`There is no job ${jobId}.`);
    const [purged] = await this.ctx.db.select().from(resultPurges).where(eq(resultPurges.jobId, jobId));
    if (purged) throw conflict(`The results of job ${jobId} were already deleted on ${purged.purgedAt.toISOString()}; rerun the job to make them again.`);
    await this.ctx.db.insert(jobPins).values({ jobId, pinnedBy: user.id, note }).onConflictDoUpdate({ target: jobPins.jobId, set: { note } });
    await writeAudit(this.ctx.db, { actor: { kind: 'user', userId: user.id, role: user.role, email: user.email }, action: 'results.pin', target: `job:${jobId}`, after: { note } });
  }

  async unpin(user: SessionUser, jobId: number): Promise<void> {
    const gone = await this.ctx.db.delete(jobPins).where(eq(jobPins.jobId, jobId)).returning();
    if (gone.length) await writeAudit(this.ctx.db, { actor: { kind: 'user', userId: user.id, role: user.role, email: user.email }, action: 'results.unpin', target: `job:${jobId}` });
  }

  async pins(): Promise<{ jobId: number; pinnedBy: number | null; pinnedAt: string; note: string }[]> {
    return (await this.ctx.db.select().from(jobPins)).map((p) => ({ jobId: p.jobId, pinnedBy: p.pinnedBy, pinnedAt: p.pinnedAt.toISOString(), note: p.note }));
  }
}

async function freeBytes(dir: string): Promise<number | null> {
  try {
    const s = await fs.statfs(dir);
    return Number(s.bavail) * Number(s.bsize);
  } catch {
    return null;
  }
}
