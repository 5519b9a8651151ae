import { bigint, doublePrecision, index, integer, jsonb, pgTable, real, serial, text } from 'drizzle-orm/pg-core';
import type { ChannelQc, RecordingFormat, RecordingSource, RecordingState } from '../../../shared/api/recordings.js';
import { archiveRoots } from './archive-roots.js';
import { arrays } from './arrays.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/**
 * A recording the service can read: an uploaded file under DATA_DIR/recordings, a file
 * registered in place under an archive root, or a demo file. Inspection (a compute child)
 * fills the header facts and per-channel QC and moves `state` to ready or rejected.
 */
export const recordings = pgTable(
  'recordings',
  {
    id: serial().primaryKey(),
    name: text().notNull(),
    source: text({ enum: ['upload', 'archive', 'demo'] }).$type<RecordingSource>().notNull(),
    /** Absolute path of the sample data file. */
    filePath: text().notNull(),
    /** Side file text for multi-file formats (SigMF meta JSON, raw-binary JSON side file). */
    sidecar: text(),
    /** Where the side file lives when registered in place (archive); null for uploads. */
    sidecarPath: text(),
    declaredFormat: text().$type<RecordingFormat>().notNull(),
    format: text().$type<RecordingFormat>(),
    sizeBytes: bigint({ mode: 'number' }).notNull(),
    /** Whole-file sha256 (hex), as inspected; `expectedSha256` is what the uploader declared. */
    sha256: text(),
    expectedSha256: text(),
    channels: integer(),
    sampleRate: doublePrecision(),
    sampleFrames: bigint({ mode: 'number' }),
    durationS: doublePrecision(),
    datatype: text(),
    state: text({ enum: ['inspecting', 'ready', 'rejected'] }).$type<RecordingState>().notNull().default('inspecting'),
    /** 0..1 while inspecting. */
    inspectProgress: real().notNull().default(0),
    rejectReasons: jsonb().$type<string[]>().notNull().default([]),
    qc: jsonb().$type<ChannelQc[]>(),
    arrayId: integer().references(() => arrays.id, { onDelete: 'restrict' }),
    archiveRootId: integer().references(() => archiveRoots.id, { onDelete: 'set null' }),
    uploadedBy: integer().references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('recordings_created_idx').on(t.createdAt), index('recordings_state_idx').on(t.state)],
);

export type RecordingRow = typeof recordings.$inferSelect;
