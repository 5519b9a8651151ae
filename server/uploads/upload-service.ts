import { randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { and, asc, eq, sql, sum } from 'drizzle-orm';
import type { CreateUploadRequest, UploadSession } from '../../shared/api/uploads.js';
import { chunkRange } from '../../shared/api/uploads.js';
import type { AppDb } from '../db/client.js';
import { recordings } from '../db/schema/recordings.js';
import { uploadChunks, uploads, type UploadRow } from '../db/schema/uploads.js';
import { HttpError, badRequest, conflict, notFound } from '../http/http-error.js';
import type { RecordingFormat } from '../../shared/api/recordings.js';
import { ChunkLengthError, writeChunkAt } from './chunk-writer.js';
import { checkSidecar, checkWavHeaderInPart } from './header-check.js';
import { recordingDir, safeFileName, uploadPartPath } from './upload-paths.js';
import { formatBytes, type UploadLimits } from './upload-limits.js';

export interface ChunkTarget {
  uploadId: string;
  name: string;
  partPath: string;
  index: number;
  start: number;
  length: number;
  sizeBytes: number;
  format: RecordingFormat;
}

export interface UploadServiceDeps {
  db: AppDb;
  dataDir: string;
  limits: UploadLimits;
  /** Called once a finished upload became a recording (hands it to inspection). */
  onRecordingCreated(recordingId: number): void;
}

/**
 * Resumable chunked uploads: sessions and acknowledged chunks in the database, bytes in
 * DATA_DIR/uploads/<id>.part until the last chunk, then the part file becomes a recording.
 */
export class UploadService {
  constructor(private readonly deps: UploadServiceDeps) {}

  async create(userId: number, req: CreateUploadRequest): Promise<UploadSession> {
    const { db, limits, dataDir } = this.deps;
    if (req.sizeBytes > limits.maxFileBytes) {
      throw new HttpError(413, 'file_too_large', `${req.name} is ${formatBytes(req.sizeBytes)}; the largest file this server accepts is ${formatBytes(limits.maxFileBytes)}. Split the recording or ask an administrator to raise UPLOAD_MAX_BYTES.`);
    }
    if ((req.format === 'sigmf' || req.format === 'raw') && !req.sidecar) {
      throw badRequest(req.format === 'sigmf'
        ? `${req.name} is SigMF data: send its .sigmf-meta file as the side file of the session (sidecar).`
        : `${req.name} is raw binary: send its JSON side file (sample rate, channels, datatype) as the side file of the session (sidecar).`);
    }
    if (req.sidecar && (req.format === 'sigmf' || req.format === 'raw')) checkSidecar(req.format, req.sidecar, req.sizeBytes, req.sidecarName ?? req.name);
    const used = await this.bytesUsedBy(userId);
    if (used + req.sizeBytes > limits.quotaBytes) {
      throw new HttpError(413, 'quota_exceeded', `Your storage quota is ${formatBytes(limits.quotaBytes)}; you already use ${formatBytes(used)} (recordings plus unfinished uploads), so ${req.name} (${formatBytes(req.sizeBytes)}) does not fit. Delete recordings or cancel unfinished uploads, or ask an administrator to raise UPLOAD_QUOTA_BYTES.`);
    }
    await fs.mkdir(path.join(dataDir, 'uploads'), { recursive: true });
    const free = await freeBytes(path.join(dataDir, 'uploads'));
    const reserved = await this.bytesStillExpected();
    if (free - reserved < req.sizeBytes + limits.diskReserveBytes) {
      throw new HttpError(507, 'disk_full', `The server has ${formatBytes(Math.max(0, free - reserved))} of disk free for new uploads and keeps ${formatBytes(limits.diskReserveBytes)} in reserve, so ${req.name} (${formatBytes(req.sizeBytes)}) cannot be accepted now. Ask an administrator to free space.`);
    }
    const id = randomUUID();
    const partPath = uploadPartPath(dataDir, id);
    const fh = await fs.open(partPath, 'wx');
    try {
      await fh.truncate(req.sizeBytes);
    } finally {
      await fh.close();
    }
    const chunkCount = Math.ceil(req.sizeBytes / limits.chunkBytes);
    try {
      await db.insert(uploads).values({
        id,
        userId,
        name: safeFileName(req.name),
        sizeBytes: req.sizeBytes,
        declaredFormat: req.format,
        sha256: req.sha256 ?? null,
        sidecar: req.sidecar ?? null,
        sidecarName: req.sidecarName ? safeFileName(req.sidecarName) : null,
        chunkBytes: limits.chunkBytes,
        chunkCount,
        partPath,
      });
    } catch (err) {
      await fs.rm(partPath, { force: true });
      throw err;
    }
    return this.get(userId, id);
  }

  async get(userId: number, id: string, isAdmin = false): Promise<UploadSession> {
    const row = await this.load(userId, id, isAdmin);
    const chunks = await this.deps.db
      .select({ index: uploadChunks.index, size: uploadChunks.sizeBytes })
      .from(uploadChunks)
      .where(eq(uploadChunks.uploadId, id))
      .orderBy(asc(uploadChunks.index));
    return toSession(row, chunks.map((c) => c.index), chunks.reduce((s, c) => s + c.size, 0));
  }

  /** The user's unfinished sessions, newest first (the client offers to resume them). */
  async listOpen(userId: number): Promise<UploadSession[]> {
    const rows = await this.deps.db.select().from(uploads).where(and(eq(uploads.userId, userId), eq(uploads.state, 'receiving'))).orderBy(sql`${uploads.createdAt} desc`);
    return Promise.all(rows.map((r) => this.get(userId, r.id)));
  }

  /** Checks that chunk `index` may be sent now and says where its bytes go. */
  async chunkTarget(userId: number, id: string, index: number): Promise<ChunkTarget> {
    const row = await this.load(userId, id);
    if (row.state !== 'receiving') {
      throw conflict(`Upload ${row.name} is ${row.state}; it takes no more chunks. Start a new upload if you need to send the file again.`);
    }
    if (!Number.isInteger(index) || index < 0 || index >= row.chunkCount) {
      throw badRequest(`Chunk index ${index} is outside this upload, which has chunks 0 to ${row.chunkCount - 1}.`);
    }
    const { start, length } = chunkRange(index, row.chunkBytes, row.sizeBytes);
    return { uploadId: id, name: row.name, partPath: row.partPath, index, start, length, sizeBytes: row.sizeBytes, format: row.declaredFormat };
  }

  /** Streams a chunk's bytes to its offset (fsynced); the chunk is not acknowledged yet. */
  async storeChunk(t: ChunkTarget, body: Readable): Promise<{ sha256: string; bytes: number }> {
    try {
      return await writeChunkAt(body, t.partPath, t.start, t.length);
    } catch (err) {
      if (err instanceof ChunkLengthError) {
        throw badRequest(`Chunk ${t.index} must be exactly ${t.length} bytes (bytes ${t.start} to ${t.start + t.length - 1} of the file) but ${err.received > t.length ? 'more' : `only ${err.received}`} arrived. Send the chunk again.`);
      }
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') {
        throw conflict(`The partial file of upload ${t.name} is gone (the upload was cancelled). Start the upload again.`);
      }
      throw err;
    }
  }

  /**
   * Records a stored chunk once its sha256 matches the one the client sent. Only then does
   * the chunk count as held, so a refused or interrupted chunk is simply sent again.
   */
  async acknowledgeChunk(t: ChunkTarget, stored: { sha256: string; bytes: number }, claimed: string | undefined): Promise<{ index: number; sha256: string }> {
    if (!claimed) {
      throw badRequest(`Chunk ${t.index} came without its sha256; send the chunk's sha256 (64 hex characters) in a form field named "sha256".`);
    }
    if (claimed !== stored.sha256) {
      throw new HttpError(422, 'chunk_checksum_mismatch', `Chunk ${t.index} was damaged on the way: you sent sha256 ${claimed} but the bytes received hash to ${stored.sha256}. The chunk was not kept; send it again.`, { index: t.index, expected: claimed, received: stored.sha256 });
    }
    if (t.index === 0 && (t.format === 'wav' || t.format === 'rf64')) {
      try {
        await checkWavHeaderInPart(t.partPath, stored.bytes, t.sizeBytes, t.name);
      } catch (err) {
        // The file itself is unreadable: no later chunk can fix it, so the session ends here.
        if (!(err instanceof HttpError)) throw err;
        await this.discard(t.uploadId, t.partPath);
        throw new HttpError(err.status, err.code, `${err.message} The upload was stopped and its partial file removed; fix the file and upload it again.`, err.details);
      }
    }
    const [row] = await this.deps.db.select({ state: uploads.state }).from(uploads).where(eq(uploads.id, t.uploadId));
    if (row?.state !== 'receiving') throw conflict(`Upload ${t.name} was ${row?.state ?? 'removed'} while this chunk arrived; the chunk was not kept.`);
    await this.deps.db
      .insert(uploadChunks)
      .values({ uploadId: t.uploadId, index: t.index, sizeBytes: stored.bytes, sha256: stored.sha256 })
      .onConflictDoUpdate({ target: [uploadChunks.uploadId, uploadChunks.index], set: { sha256: stored.sha256, sizeBytes: stored.bytes, receivedAt: new Date() } });
    return { index: t.index, sha256: stored.sha256 };
  }

  /**
   * All chunks in: the part file moves to DATA_DIR/recordings/<id>/ and becomes a recording in
   * state 'inspecting'; the compute child then checks the whole-file sha256 and the header.
   */
  async complete(userId: number, id: string): Promise<{ recordingId: number }> {
    const { db, dataDir } = this.deps;
    const row = await this.load(userId, id);
    if (row.state === 'complete' && row.recordingId) return { recordingId: row.recordingId };
    if (row.state !== 'receiving') throw conflict(`Upload ${row.name} was ${row.state}; start it again.`);
    const have = await db.select({ index: uploadChunks.index }).from(uploadChunks).where(eq(uploadChunks.uploadId, id));
    if (have.length < row.chunkCount) {
      const got = new Set(have.map((h) => h.index));
      const missing = Array.from({ length: row.chunkCount }, (_, i) => i).filter((i) => !got.has(i));
      throw conflict(`Upload ${row.name} still lacks ${missing.length} of ${row.chunkCount} chunks (first missing: ${missing.slice(0, 10).join(', ')}). Send them, then finish again.`, { missing });
    }
    const recordingId = await db.transaction(async (tx) => {
      const [rec] = await tx
        .insert(recordings)
        .values({
          name: row.name,
          source: 'upload',
          filePath: '',
          sidecar: row.sidecar,
          declaredFormat: row.declaredFormat,
          sizeBytes: row.sizeBytes,
          expectedSha256: row.sha256,
          state: 'inspecting',
          uploadedBy: userId,
        })
        .returning({ id: recordings.id });
      const dir = recordingDir(dataDir, rec.id);
      const filePath = path.join(dir, row.name);
      const sidecarPath = row.sidecar ? path.join(dir, row.sidecarName ?? sidecarNameFor(row.name, row.declaredFormat)) : null;
      await tx.update(recordings).set({ filePath, sidecarPath }).where(eq(recordings.id, rec.id));
      await tx.update(uploads).set({ state: 'complete', recordingId: rec.id, updatedAt: new Date() }).where(eq(uploads.id, id));
      return rec.id;
    });
    await this.placeFile(recordingId, row);
    this.deps.onRecordingCreated(recordingId);
    return { recordingId };
  }

  /** Moves a completed upload's part file (and side file) into its recording folder; idempotent. */
  async placeFile(recordingId: number, row: Pick<UploadRow, 'partPath' | 'name' | 'sidecar' | 'sidecarName' | 'declaredFormat'>): Promise<void> {
    const [rec] = await this.deps.db.select({ filePath: recordings.filePath, sidecarPath: recordings.sidecarPath }).from(recordings).where(eq(recordings.id, recordingId));
    if (!rec) return;
    await fs.mkdir(path.dirname(rec.filePath), { recursive: true });
    try {
      await fs.rename(row.partPath, rec.filePath);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
    }
    if (rec.sidecarPath && row.sidecar !== null) await fs.writeFile(rec.sidecarPath, row.sidecar);
  }

  /** Cancel: the partial file and the chunk records go; the session stays as 'cancelled'. */
  async cancel(userId: number, id: string, isAdmin = false): Promise<void> {
    const row = await this.load(userId, id, isAdmin);
    if (row.state === 'complete') {
      throw conflict(`Upload ${row.name} already finished and became recording ${row.recordingId}; delete the recording instead.`);
    }
    await this.discard(id, row.partPath);
  }

  private async discard(id: string, partPath: string): Promise<void> {
    await this.deps.db.update(uploads).set({ state: 'cancelled', updatedAt: new Date() }).where(eq(uploads.id, id));
    await this.deps.db.delete(uploadChunks).where(eq(uploadChunks.uploadId, id));
    await fs.rm(partPath, { force: true });
  }

  /** Completed sessions whose file move a crash interrupted: finish the move (start-up). */
  async finishInterruptedMoves(): Promise<number> {
    const rows = await this.deps.db.select().from(uploads).where(eq(uploads.state, 'complete'));
    let moved = 0;
    for (const r of rows) {
      if (!r.recordingId) continue;
      if (await exists(r.partPath)) {
        await this.placeFile(r.recordingId, r);
        moved++;
      }
    }
    return moved;
  }

  private async load(userId: number, id: string, isAdmin = false): Promise<UploadRow> {
    if (!/^[0-9a-f-]{36}$/.test(id)) throw notFound(`There is no upload ${id}. List your uploads with GET /api/uploads.`);
    const [row] = await this.deps.db.select().from(uploads).where(eq(uploads.id, id));
    if (!row || (row.userId !== userId && !isAdmin)) throw notFound(`There is no upload ${id} of yours. It may have been cancelled; start the upload again.`);
    return row;
  }

  private async bytesUsedBy(userId: number): Promise<number> {
    const [recs] = await this.deps.db.select({ total: sum(recordings.sizeBytes) }).from(recordings).where(and(eq(recordings.uploadedBy, userId), eq(recordings.source, 'upload')));
    const [open] = await this.deps.db.select({ total: sum(uploads.sizeBytes) }).from(uploads).where(and(eq(uploads.userId, userId), eq(uploads.state, 'receiving')));
    return Number(recs?.total ?? 0) + Number(open?.total ?? 0);
  }

  /** Bytes promised to open sessions but not yet written (sparse part files do not hold them yet). */
  private async bytesStillExpected(): Promise<number> {
    const [open] = await this.deps.db.select({ total: sum(uploads.sizeBytes) }).from(uploads).where(eq(uploads.state, 'receiving'));
    const [got] = await this.deps.db
      .select({ total: sum(uploadChunks.sizeBytes) })
      .from(uploadChunks)
      .innerJoin(uploads, eq(uploads.id, uploadChunks.uploadId))
      .where(eq(uploads.state, 'receiving'));
    return Math.max(0, Number(open?.total ?? 0) - Number(got?.total ?? 0));
  }
}

function toSession(row: UploadRow, received: number[], receivedBytes: number): UploadSession {
  return {
    id: row.id,
    name: row.name,
    sizeBytes: row.sizeBytes,
    format: row.declaredFormat,
    chunkBytes: row.chunkBytes,
    chunkCount: row.chunkCount,
    received,
    receivedBytes,
    state: row.state,
    recordingId: row.recordingId,
    createdAt: row.createdAt.toISOString(),
  };
}

function sidecarNameFor(dataName: string, format: string): string {
  const stem = dataName.replace(/\.[^.]*$/, '');
  return format === 'sigmf' ? `${stem}.sigmf-meta` : `${dataName}.json`;
}

async function freeBytes(dir: string): Promise<number> {
  const s = await fs.statfs(dir);
  return s.bavail * s.bsize;
}

async function exists(p: string): Promise<boolean> {
  try {
    await fs.access(p);
    return true;
  } catch {
    return false;
  }
}
