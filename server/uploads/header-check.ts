import fs from 'node:fs/promises';
import { HEADER_PROBE_BYTES } from '../../shared/formats/limits.js';
import { parseRawSidecar } from '../../shared/formats/raw-sidecar.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { parseSigmfMeta } from '../../shared/formats/sigmf-meta.js';
import { parseWavHeader } from '../../shared/formats/wav-header.js';
import type { RecordingFormat } from '../../shared/api/recordings.js';
import { HttpError } from '../http/http-error.js';

/**
 * Server-side header checks, the same shared parsers the browser runs, so a client that skips
 * them still cannot store a file Nullsmith cannot read. Headers are small: parsing one in the
 * server process is fine; the whole-file pass happens in a compute child.
 */
export function badHeader(err: RecordingFormatError): HttpError {
  return new HttpError(422, 'bad_header', err.message, err.toJSON());
}

/** SigMF and raw: the side file against the declared data size, before any byte is sent. */
export function checkSidecar(format: RecordingFormat, sidecar: string, dataSize: number, name: string): void {
  try {
    if (format === 'sigmf') parseSigmfMeta(sidecar, dataSize, name);
    else if (format === 'raw') parseRawSidecar(sidecar, dataSize, name);
  } catch (err) {
    if (err instanceof RecordingFormatError) throw badHeader(err);
    throw err;
  }
}

/**
 * WAV/RF64: parses the header from the first stored bytes of the part file (chunk 0).
 * A header that continues past them is left for the inspection pass.
 */
export async function checkWavHeaderInPart(partPath: string, storedBytes: number, fileSize: number, name: string): Promise<void> {
  const n = Math.min(storedBytes, HEADER_PROBE_BYTES);
  const fh = await fs.open(partPath, 'r');
  let bytes: Buffer;
  try {
    bytes = Buffer.alloc(n);
    await fh.read(bytes, 0, n, 0);
  } finally {
    await fh.close();
  }
  try {
    parseWavHeader(bytes, fileSize, name);
  } catch (err) {
    if (err instanceof RecordingFormatError) {
      if (err.bytesNeeded !== undefined && err.bytesNeeded > n) return;
      throw badHeader(err);
    }
    throw err;
  }
}
