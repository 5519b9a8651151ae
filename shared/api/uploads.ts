import * as z from 'zod';
import { recordingFormatSchema } from './recordings.js';

export const UPLOAD_STATES = ['receiving', 'complete', 'cancelled'] as const;
export type UploadState = (typeof UPLOAD_STATES)[number];

const sha256Hex = z
  .string()
  .trim()
  .toLowerCase()
  .regex(/^[0-9a-f]{64}$/, 'sha256 must be 64 hexadecimal characters');

/** Largest side file accepted inline with a session (SigMF meta, raw JSON side file). */
export const MAX_SIDECAR_BYTES = 1024 * 1024;

/**
 * POST /api/uploads: open a session for one data file. Multi-file formats send their small
 * side file inline as `sidecar` (its text) and `sidecarName`; only the data file is chunked.
 */
export const createUploadSchema = z.object({
  name: z
    .string()
    .trim()
    .min(1, 'Give the file name.')
    .max(300, 'File names are at most 300 characters.')
    // a NUL or line break cannot be stored or shown faithfully (PostgreSQL text refuses NUL): say so instead
    .refine((n) => !/[\u0000-\u001f\u007f]/.test(n), 'File names cannot contain control characters (NUL, tab, line breaks); rename the file and upload it again.'),
  sizeBytes: z.number({ error: 'sizeBytes must be the file size in bytes' }).int('sizeBytes must be a whole number').positive('The file is empty: nothing to upload.'),
  format: recordingFormatSchema,
  sha256: sha256Hex.optional(),
  sidecar: z.string().max(MAX_SIDECAR_BYTES, 'The side file is larger than 1 MiB; side files hold metadata only.').optional(),
  sidecarName: z.string().trim().max(300).optional(),
});
export type CreateUploadRequest = z.infer<typeof createUploadSchema>;

/** An upload session as the API shows it. */
export interface UploadSession {
  id: string;
  name: string;
  sizeBytes: number;
  format: string;
  chunkBytes: number;
  chunkCount: number;
  /** Indices of chunks the server holds (fsynced and recorded). */
  received: number[];
  receivedBytes: number;
  state: UploadState;
  recordingId: number | null;
  createdAt: string;
}

/** Chunk sizes the server hands out (issue 4: 8–32 MiB). */
export const MIN_CHUNK_BYTES = 8 * 1024 * 1024;
export const MAX_CHUNK_BYTES = 32 * 1024 * 1024;

/** Multipart field carrying a chunk's sha256; send it before the file part. */
export const CHUNK_SHA_FIELD = 'sha256';
export const CHUNK_FILE_FIELD = 'chunk';

export const chunkShaSchema = sha256Hex;

/** Byte range of chunk `index` in a file of `size` bytes cut into `chunkBytes` pieces. */
export function chunkRange(index: number, chunkBytes: number, size: number): { start: number; length: number } {
  const start = index * chunkBytes;
  return { start, length: Math.max(0, Math.min(chunkBytes, size - start)) };
}
