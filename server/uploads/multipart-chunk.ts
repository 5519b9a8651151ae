import busboy from 'busboy';
import type { Request } from 'express';
import type { Readable } from 'node:stream';
import { CHUNK_FILE_FIELD, CHUNK_SHA_FIELD, chunkShaSchema } from '../../shared/api/uploads.js';
import { badRequest } from '../http/http-error.js';

/**
 * Parses one chunk request (multipart/form-data: a `sha256` field and one `chunk` file part)
 * with busboy, handing the file stream to `store` as it arrives (never buffered whole).
 * Resolves once the whole request is read, with the stored result and the claimed sha256
 * (which may come before or after the file part).
 */
export function readChunkRequest<T>(req: Request, maxBytes: number, store: (file: Readable) => Promise<T>): Promise<{ stored: T; claimedSha: string | undefined }> {
  return new Promise((resolve, reject) => {
    const type = req.headers['content-type'] ?? '';
    if (!type.toLowerCase().startsWith('multipart/form-data')) {
      reject(badRequest(`Send chunks as multipart/form-data with a "${CHUNK_SHA_FIELD}" field and a "${CHUNK_FILE_FIELD}" file part (got ${type || 'no content type'}).`));
      return;
    }
    let bb: busboy.Busboy;
    try {
      bb = busboy({ headers: req.headers, limits: { files: 1, fields: 4, fieldSize: 1024, parts: 6, fileSize: maxBytes + 1 } });
    } catch (err) {
      reject(badRequest(`The chunk request is not valid multipart/form-data (${err instanceof Error ? err.message : String(err)}).`));
      return;
    }
    let claimed: string | undefined;
    let claimError: Error | undefined;
    let storing: Promise<T> | undefined;
    let failed = false;
    const fail = (err: unknown) => {
      if (failed) return;
      failed = true;
      req.unpipe(bb);
      req.resume(); // drain the rest so the response can go out on the same connection
      reject(err);
    };
    bb.on('field', (name, value) => {
      if (name !== CHUNK_SHA_FIELD) return;
      const parsed = chunkShaSchema.safeParse(value);
      if (parsed.success) claimed = parsed.data;
      else claimError = badRequest(`The "${CHUNK_SHA_FIELD}" field must be the chunk's sha256 as 64 hexadecimal characters.`);
    });
    bb.on('file', (name, file) => {
      if (name !== CHUNK_FILE_FIELD || storing) {
        file.resume();
        return;
      }
      storing = store(file);
      storing.catch((err: unknown) => {
        file.resume();
        fail(err);
      });
    });
    bb.on('error', (err: unknown) => fail(badRequest(`The chunk request broke off or is malformed (${err instanceof Error ? err.message : String(err)}). Send the chunk again.`)));
    bb.on('close', () => {
      if (failed) return;
      if (!storing) {
        fail(badRequest(`The request carried no "${CHUNK_FILE_FIELD}" file part; send the chunk bytes as a file part named "${CHUNK_FILE_FIELD}".`));
        return;
      }
      storing.then(
        (stored) => {
          if (claimError) fail(claimError);
          else resolve({ stored, claimedSha: claimed });
        },
        () => undefined, // already reported through fail()
      );
    });
    req.on('aborted', () => fail(badRequest('The chunk upload was interrupted. Send the chunk again.')));
    req.pipe(bb);
  });
}
