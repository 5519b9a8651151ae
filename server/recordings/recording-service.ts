import fs from 'node:fs/promises';
import path from 'node:path';
import { and, asc, count, desc, eq, ilike, or, sql, type SQL } from 'drizzle-orm';
import type { SessionUser } from '../../shared/api/auth.js';
import { channelsNeeded } from '../../shared/api/arrays.js';
import type { RecordingDetail, RecordingListQuery, RecordingListResponse, RecordingPatch, RecordingSummary } from '../../shared/api/recordings.js';
import { roleAtLeast } from '../../shared/roles.js';
import type { AppDb } from '../db/client.js';
import { arrays } from '../db/schema/arrays.js';
import { jobs } from '../db/schema/jobs.js';
import { recordings, type RecordingRow } from '../db/schema/recordings.js';
import { users } from '../db/schema/users.js';
import { badRequest, conflict, forbidden, notFound } from '../http/http-error.js';
import { recordingDir } from '../uploads/upload-paths.js';

const SORT_COLUMNS = {
  name: recordings.name,
  format: recordings.format,
  channels: recordings.channels,
  sampleRate: recordings.sampleRate,
  durationS: recordings.durationS,
  sizeBytes: recordings.sizeBytes,
  state: recordings.state,
  createdAt: recordings.createdAt,
} as const;

/** Reading, renaming, linking and deleting recordings. */
export class RecordingService {
  constructor(private readonly db: AppDb, private readonly dataDir: string) {}

  async list(q: RecordingListQuery): Promise<RecordingListResponse> {
    const filters: SQL[] = [];
    if (q.q) {
      const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
      filters.push(or(ilike(recordings.name, like), ilike(recordings.format, like), ilike(recordings.state, like), ilike(arrays.name, like))!);
    }
    if (q.state) filters.push(eq(recordings.state, q.state));
    const where = filters.length ? and(...filters) : undefined;
    const column = SORT_COLUMNS[q.sort];
    const order = q.dir === 'asc' ? asc(column) : desc(column);
    const rows = await this.summaryQuery()
      .where(where)
      .orderBy(order, desc(recordings.id))
      .limit(q.pageSize)
      .offset(q.page * q.pageSize);
    const [{ total }] = await this.db
      .select({ total: count() })
      .from(recordings)
      .leftJoin(arrays, eq(arrays.id, recordings.arrayId))
      .where(where);
    return { items: rows.map(toSummary), total, page: q.page, pageSize: q.pageSize };
  }

  async detail(id: number): Promise<RecordingDetail> {
    const [row] = await this.summaryQuery().where(eq(recordings.id, id));
    if (!row) throw missing(id);
    const usedBy = await this.db
      .select({ id: jobs.id, state: jobs.state, createdAt: jobs.createdAt })
      .from(jobs)
      .where(or(eq(jobs.recordingId, id), eq(jobs.trainingRecordingId, id)))
      .orderBy(desc(jobs.createdAt))
      .limit(200);
    const r = row.rec;
    return {
      ...toSummary(row),
      sha256: r.sha256,
      expectedSha256: r.expectedSha256,
      sampleFrames: r.sampleFrames,
      datatype: r.datatype,
      rejectReasons: r.rejectReasons,
      qc: r.qc,
      filePath: r.source === 'archive' ? r.filePath : path.basename(r.filePath),
      jobs: usedBy.map((j) => ({ id: j.id, state: j.state, createdAt: j.createdAt.toISOString() })),
    };
  }

  async row(id: number): Promise<RecordingRow> {
    const [row] = await this.db.select().from(recordings).where(eq(recordings.id, id));
    if (!row) throw missing(id);
    return row;
  }

  async patch(id: number, patch: RecordingPatch, user: SessionUser): Promise<RecordingDetail> {
    const rec = await this.row(id);
    this.assertMayChange(rec, user, 'change');
    const set: Partial<typeof recordings.$inferInsert> = {};
    if (patch.name !== undefined) set.name = patch.name;
    if (patch.arrayId !== undefined) {
      if (patch.arrayId !== null) {
        const [arr] = await this.db.select().from(arrays).where(eq(arrays.id, patch.arrayId));
        if (!arr) throw badRequest(`There is no array ${patch.arrayId}. Pick one from the Arrays catalogue.`);
        if (rec.channels === null) {
          throw conflict(`Recording ${rec.name} is still ${rec.state === 'inspecting' ? 'being inspected' : 'unreadable'}, so its channel count is unknown. Link an array once it is ready.`);
        }
        const needed = channelsNeeded(arr.geometry);
        if (needed > rec.channels) {
          throw conflict(`Array "${arr.name}" reads channel ${needed - 1} (it needs ${needed} channels) but recording ${rec.name} has ${rec.channels}. Pick an array whose channel map fits, or fix the map in the array.`);
        }
      }
      set.arrayId = patch.arrayId;
    }
    if (Object.keys(set).length) await this.db.update(recordings).set({ ...set, updatedAt: sql`now()` }).where(eq(recordings.id, id));
    return this.detail(id);
  }

  /**
   * Deletes a recording no job used. Uploaded and demo files are removed from DATA_DIR;
   * archive-registered files are only forgotten, never touched.
   */
  async remove(id: number, user: SessionUser): Promise<void> {
    const rec = await this.row(id);
    this.assertMayChange(rec, user, 'delete');
    const [{ n }] = await this.db.select({ n: count() }).from(jobs).where(or(eq(jobs.recordingId, id), eq(jobs.trainingRecordingId, id)));
    if (n > 0) {
      throw conflict(`Recording ${rec.name} was used by ${n} job${n === 1 ? '' : 's'}; it stays so their results and reruns keep their source.`, { jobs: n });
    }
    await this.db.delete(recordings).where(eq(recordings.id, id));
    if (rec.source !== 'archive') {
      await fs.rm(recordingDir(this.dataDir, id), { recursive: true, force: true });
    }
  }

  /** Sends a recording back to inspection (after a fix on disk, or a failed inspection). */
  async markForInspection(id: number, user: SessionUser): Promise<void> {
    const rec = await this.row(id);
    this.assertMayChange(rec, user, 'change');
    await this.db
      .update(recordings)
      .set({ state: 'inspecting', inspectProgress: 0, rejectReasons: [], updatedAt: sql`now()` })
      .where(eq(recordings.id, id));
  }

  private assertMayChange(rec: RecordingRow, user: SessionUser, what: 'change' | 'delete'): void {
    if (rec.uploadedBy !== user.id && !roleAtLeast(user.role, 'operations')) {
      throw forbidden(`Only the person who added recording ${rec.name}, or someone with the operations role, may ${what} it.`);
    }
  }

  private summaryQuery() {
    return this.db
      .select({ rec: recordings, arrayName: arrays.name, arrayVersion: arrays.version, uploaderName: users.displayName })
      .from(recordings)
      .leftJoin(arrays, eq(arrays.id, recordings.arrayId))
      .leftJoin(users, eq(users.id, recordings.uploadedBy))
      .$dynamic();
  }
}

function toSummary(row: { rec: RecordingRow; arrayName: string | null; arrayVersion: number | null; uploaderName: string | null }): RecordingSummary {
  const r = row.rec;
  return {
    id: r.id,
    name: r.name,
    source: r.source,
    format: r.format,
    declaredFormat: r.declaredFormat,
    channels: r.channels,
    sampleRate: r.sampleRate,
    durationS: r.durationS,
    sizeBytes: r.sizeBytes,
    state: r.state,
    inspectProgress: r.inspectProgress,
    arrayId: r.arrayId,
    arrayName: row.arrayName === null ? null : `${row.arrayName} (v${row.arrayVersion})`,
    uploadedBy: row.uploaderName,
    createdAt: r.createdAt.toISOString(),
  };
}

const missing = (id: number) => notFound(`There is no recording ${id}. It may have been deleted; reload the recordings list.`);
