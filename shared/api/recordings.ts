import * as z from 'zod';

/** File formats Nullsmith reads (DOMAIN.md §4). 'rf64' covers RF64 and BW64. */
export const RECORDING_FORMATS = ['wav', 'rf64', 'sigmf', 'raw'] as const;
export const recordingFormatSchema = z.enum(RECORDING_FORMATS, {
  error: `format must be one of ${RECORDING_FORMATS.join(', ')}`,
});
export type RecordingFormat = z.infer<typeof recordingFormatSchema>;

export const RECORDING_STATES = ['inspecting', 'ready', 'rejected'] as const;
export type RecordingState = (typeof RECORDING_STATES)[number];
export type RecordingSource = 'upload' | 'archive' | 'demo';

/** Per-channel quality figures from inspection (full scale = 1.0, CONVENTIONS.md scaling). */
export interface ChannelQc {
  channel: number;
  rms: number;
  peak: number;
  /** Samples at or beyond 0.999 of full scale (integer PCM) or |x| ≥ 1 (float). */
  clipped: number;
  dcOffset: number;
  /** RMS below 1e-6 of full scale: an unconnected or dead channel. */
  dead: boolean;
  /** Every sample identical (including all zero): a stuck channel. */
  flat: boolean;
}

/** Thresholds behind the flags, shown beside the QC table so the reader can judge them. */
export const QC_THRESHOLDS = {
  clipFraction: 0.999,
  deadRms: 1e-6,
} as const;

/** One row of the recordings table. */
export interface RecordingSummary {
  id: number;
  name: string;
  source: RecordingSource;
  format: RecordingFormat | null;
  declaredFormat: RecordingFormat;
  channels: number | null;
  sampleRate: number | null;
  durationS: number | null;
  sizeBytes: number;
  state: RecordingState;
  inspectProgress: number;
  arrayId: number | null;
  arrayName: string | null;
  uploadedBy: string | null;
  createdAt: string;
}

export interface RecordingJobRef {
  id: number | string;
  state: string;
  createdAt: string | null;
}

export interface RecordingDetail extends RecordingSummary {
  sha256: string | null;
  expectedSha256: string | null;
  sampleFrames: number | null;
  datatype: string | null;
  rejectReasons: string[];
  qc: ChannelQc[] | null;
  filePath: string;
  jobs: RecordingJobRef[];
}

export const RECORDING_SORT_KEYS = ['name', 'format', 'channels', 'sampleRate', 'durationS', 'sizeBytes', 'state', 'createdAt'] as const;

/** GET /api/recordings query: server-side sort, filter and pagination. */
export const recordingListQuerySchema = z.object({
  page: z.coerce.number({ error: 'page must be a whole number from 0' }).int().min(0, 'page starts at 0').default(0),
  pageSize: z.coerce.number({ error: 'pageSize must be a whole number' }).int().min(1, 'pageSize must be at least 1').max(200, 'pageSize is at most 200').default(25),
  sort: z.enum(RECORDING_SORT_KEYS, { error: `sort must be one of ${RECORDING_SORT_KEYS.join(', ')}` }).default('createdAt'),
  dir: z.enum(['asc', 'desc'], { error: 'dir must be asc or desc' }).default('desc'),
  /** Matches name, format or state (case-insensitive substring). */
  q: z.string().trim().max(200, 'filter text is at most 200 characters').default(''),
  state: z.enum(RECORDING_STATES, { error: `state must be one of ${RECORDING_STATES.join(', ')}` }).optional(),
});
export type RecordingListQuery = z.infer<typeof recordingListQuerySchema>;

export interface RecordingListResponse {
  items: RecordingSummary[];
  total: number;
  page: number;
  pageSize: number;
}

/** PATCH /api/recordings/:id body: rename, link or unlink an array. */
export const recordingPatchSchema = z
  .object({
    name: z.string().trim().min(1, 'A recording needs a name.').max(300, 'Names are at most 300 characters.').optional(),
    arrayId: z.number().int().positive('arrayId must be an array id from the catalogue').nullable().optional(),
  })
  .strict();
export type RecordingPatch = z.infer<typeof recordingPatchSchema>;

/** An archive root: a server folder whose files are registered in place (admins configure them). */
export interface ArchiveRoot {
  id: number;
  name: string;
  path: string;
  notes: string;
  createdAt: string;
  recordingCount: number;
  /** False when the folder is gone or unreadable now. */
  reachable: boolean;
}

export const archiveRootRequestSchema = z.object({
  name: z.string().trim().min(1, 'Give the archive folder a name.').max(200, 'Names are at most 200 characters.'),
  path: z.string().trim().min(1, 'Give the folder path on the server.').max(4000, 'Paths are at most 4000 characters.'),
  notes: z.string().max(2000).optional(),
});
export type ArchiveRootRequest = z.infer<typeof archiveRootRequestSchema>;

export interface ArchiveEntry {
  name: string;
  /** Path relative to the root. */
  path: string;
  kind: 'file' | 'folder';
  sizeBytes: number;
  format: RecordingFormat | null;
  /** Set when the entry is listed but may not be registered (e.g. a link leaving the root). */
  refused?: string;
  /** Set when the file is already registered. */
  recordingId?: number;
}

export interface ArchiveListing {
  rootId: number;
  path: string;
  entries: ArchiveEntry[];
}

/** POST /api/archives/:id/register: files by path, or a folder by pattern (recursively if asked). */
export const archiveRegisterSchema = z
  .object({
    paths: z.array(z.string().min(1).max(4000)).max(2000, 'Register at most 2000 files at a time.').optional(),
    folder: z.string().max(4000).optional(),
    pattern: z.string().max(200).optional(),
    recursive: z.boolean().optional(),
  })
  .refine((r) => (r.paths && r.paths.length > 0) || r.folder !== undefined, {
    message: 'Name files to register (paths) or a folder with a pattern (folder, pattern, recursive).',
  });
export type ArchiveRegisterRequest = z.infer<typeof archiveRegisterSchema>;

export interface ArchiveRegisterResult {
  registered: { id: number; name: string; path: string }[];
  refused: { path: string; reason: string }[];
}
