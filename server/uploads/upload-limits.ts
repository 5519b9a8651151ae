import { z } from 'zod';
import { MAX_CHUNK_BYTES, MIN_CHUNK_BYTES } from '../../shared/api/uploads.js';

const GiB = 1024 ** 3;
const MiB = 1024 ** 2;

/** Upload limits, from the environment (README "Uploads"). Sizes in bytes. */
export interface UploadLimits {
  /** Largest single file accepted (UPLOAD_MAX_BYTES, default 64 GiB). */
  maxFileBytes: number;
  /** Per-user total of uploaded recordings plus open sessions (UPLOAD_QUOTA_BYTES, default 512 GiB). */
  quotaBytes: number;
  /** Chunk size handed to clients (UPLOAD_CHUNK_BYTES, 8–32 MiB, default 16 MiB). */
  chunkBytes: number;
  /** Disk space always left free after an upload is accepted (UPLOAD_DISK_RESERVE_BYTES, default 1 GiB). */
  diskReserveBytes: number;
}

const bytes = (name: string, fallback: number) =>
  z.coerce
    .number({ error: `${name} must be a whole number of bytes` })
    .int(`${name} must be a whole number of bytes`)
    .positive(`${name} must be more than 0 bytes`)
    .default(fallback);

const limitsEnv = z.object({
  UPLOAD_MAX_BYTES: bytes('UPLOAD_MAX_BYTES', 64 * GiB),
  UPLOAD_QUOTA_BYTES: bytes('UPLOAD_QUOTA_BYTES', 512 * GiB),
  UPLOAD_CHUNK_BYTES: bytes('UPLOAD_CHUNK_BYTES', 16 * MiB)
    .refine((v) => v >= MIN_CHUNK_BYTES && v <= MAX_CHUNK_BYTES, 'UPLOAD_CHUNK_BYTES must be from 8 MiB (8388608) to 32 MiB (33554432)'),
  UPLOAD_DISK_RESERVE_BYTES: z.coerce.number().int().min(0, 'UPLOAD_DISK_RESERVE_BYTES must be 0 or more').default(GiB),
});

/** Reads the limits; throws an Error naming each bad variable and what to set. */
export function loadUploadLimits(env: NodeJS.ProcessEnv = process.env): UploadLimits {
  const cleaned = Object.fromEntries(Object.keys(limitsEnv.shape).map((k) => [k, env[k] === '' ? undefined : env[k]]));
  const parsed = limitsEnv.safeParse(cleaned);
  if (!parsed.success) {
    throw new Error(`Upload settings are not valid: ${parsed.error.issues.map((i) => i.message).join('; ')}.`);
  }
  const e = parsed.data;
  return {
    maxFileBytes: e.UPLOAD_MAX_BYTES,
    quotaBytes: e.UPLOAD_QUOTA_BYTES,
    chunkBytes: e.UPLOAD_CHUNK_BYTES,
    diskReserveBytes: e.UPLOAD_DISK_RESERVE_BYTES,
  };
}

/** "64 GiB", "200 MiB", "512 B": sizes in refusal messages. */
export function formatBytes(n: number): string {
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let v = n;
  let u = 0;
  while (v >= 1024 && u < units.length - 1) {
    v /= 1024;
    u++;
  }
  return `${u === 0 ? v : v.toFixed(v >= 100 ? 0 : 1)} ${units[u]}`;
}
