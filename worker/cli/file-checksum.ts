/** SHA-256 of a file, streamed (recordings can be many GB). */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';

export async function sha256File(file: string, onBytes?: (bytes: number) => void): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(file, { highWaterMark: 1 << 20 })) {
    hash.update(chunk as Buffer);
    onBytes?.((chunk as Buffer).length);
  }
  return hash.digest('hex');
}
