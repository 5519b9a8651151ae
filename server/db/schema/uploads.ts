import { bigint, index, integer, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';
import type { RecordingFormat } from '../../../shared/api/recordings.js';
import type { UploadState } from '../../../shared/api/uploads.js';
import { recordings } from './recordings.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/**
 * A resumable upload session. The partial file lives at `partPath` (DATA_DIR/uploads/<id>.part);
 * which chunks it holds is `upload_chunks`, written only after the chunk's bytes were fsynced,
 * so a crash never claims a chunk that is not on disk.
 */
export const uploads = pgTable(
  'uploads',
  {
    id: text().primaryKey(),
    userId: integer().notNull().references(() => users.id, { onDelete: 'cascade' }),
    name: text().notNull(),
    sizeBytes: bigint({ mode: 'number' }).notNull(),
    declaredFormat: text().$type<RecordingFormat>().notNull(),
    /** Whole-file sha256 the client declared (hex), checked on completion. */
    sha256: text(),
    /** Small side file for multi-file formats (SigMF meta, raw JSON side file), sent with the session. */
    sidecar: text(),
    sidecarName: text(),
    chunkBytes: integer().notNull(),
    chunkCount: integer().notNull(),
    state: text({ enum: ['receiving', 'complete', 'cancelled'] }).$type<UploadState>().notNull().default('receiving'),
    partPath: text().notNull(),
    recordingId: integer().references(() => recordings.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('uploads_user_state_idx').on(t.userId, t.state)],
);

/** One row per acknowledged chunk of an upload. */
export const uploadChunks = pgTable(
  'upload_chunks',
  {
    uploadId: text().notNull().references(() => uploads.id, { onDelete: 'cascade' }),
    index: integer().notNull(),
    sizeBytes: integer().notNull(),
    sha256: text().notNull(),
    receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.uploadId, t.index] })],
);

export type UploadRow = typeof uploads.$inferSelect;
