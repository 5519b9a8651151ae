import crypto from 'node:crypto';
import fs from 'node:fs';
import { PermanentTaskError, throwIfAborted, type ComputeTask } from './compute-task.js';

export interface FileDigestPayload {
  path: string;
  /** node:crypto hash name; sha256 unless said otherwise. */
  algorithm?: string;
}
export interface FileDigestResult {
  algorithm: string;
  hex: string;
  bytes: number;
}

const CHUNK = 4 * 1024 * 1024;

/**
 * Hashes a whole file off the node's event loop, with byte progress, stopping between chunks
 * on cancel. Used to verify archive-registered recordings and result files of any size.
 */
export const fileDigestTask: ComputeTask<FileDigestPayload, FileDigestResult> = {
  kind: 'file-digest',
  async run(payload, { signal, progress }) {
    const algorithm = payload.algorithm ?? 'sha256';
    if (!crypto.getHashes().includes(algorithm)) {
      throw new PermanentTaskError(`Unknown hash "${algorithm}"; use one of sha256, sha512, sha1, md5.`);
    }
    const fh = await fs.promises.open(payload.path, 'r').catch((e: NodeJS.ErrnoException) => {
      throw new PermanentTaskError(`Cannot open ${payload.path} to hash it (${e.code ?? e.message}); check the file exists and is readable.`);
    });
    try {
      const total = (await fh.stat()).size;
      const hash = crypto.createHash(algorithm);
      const buf = Buffer.allocUnsafe(CHUNK);
      let done = 0;
      progress(0, total);
      while (done < total) {
        throwIfAborted(signal);
        const { bytesRead } = await fh.read(buf, 0, Math.min(CHUNK, total - done), done);
        if (bytesRead === 0) break;
        hash.update(buf.subarray(0, bytesRead));
        done += bytesRead;
        progress(done, total);
      }
      return { algorithm, hex: hash.digest('hex'), bytes: done };
    } finally {
      await fh.close();
    }
  },
};
