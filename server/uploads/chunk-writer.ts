import { createHash } from 'node:crypto';
import type { FileHandle } from 'node:fs/promises';
import fs from 'node:fs/promises';
import { Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { Readable } from 'node:stream';

export class ChunkLengthError extends Error {
  constructor(readonly received: number, readonly expected: number) {
    super(`chunk has ${received > expected ? 'more than ' : ''}${received} bytes, expected ${expected}`);
  }
}

/**
 * Streams one chunk straight to its offset in the part file, hashing on the way, and fsyncs
 * before resolving, so a caller that records the chunk afterwards never claims bytes that a
 * crash could lose. Memory stays at the stream's buffers: each piece is written and released
 * before the next is read (back-pressure through pipeline).
 */
export async function writeChunkAt(source: Readable, partPath: string, offset: number, expectedLength: number): Promise<{ sha256: string; bytes: number }> {
  const handle = await fs.open(partPath, 'r+');
  try {
    const hash = createHash('sha256');
    const sink = new PositionedWriter(handle, offset, expectedLength, hash);
    await pipeline(source, sink);
    if (sink.written !== expectedLength) throw new ChunkLengthError(sink.written, expectedLength);
    await handle.sync();
    return { sha256: hash.digest('hex'), bytes: sink.written };
  } finally {
    await handle.close();
  }
}

class PositionedWriter extends Writable {
  written = 0;

  constructor(
    private readonly handle: FileHandle,
    private readonly offset: number,
    private readonly limit: number,
    private readonly hash: ReturnType<typeof createHash>,
  ) {
    super({ highWaterMark: 1024 * 1024 });
  }

  override _write(piece: Buffer, _enc: BufferEncoding, done: (err?: Error | null) => void): void {
    if (this.written + piece.length > this.limit) {
      done(new ChunkLengthError(this.written + piece.length, this.limit));
      return;
    }
    this.hash.update(piece);
    const at = this.offset + this.written;
    this.written += piece.length;
    writeFully(this.handle, piece, at).then(() => done(), done);
  }
}

async function writeFully(handle: FileHandle, buf: Buffer, position: number): Promise<void> {
  let off = 0;
  while (off < buf.length) {
    const { bytesWritten } = await handle.write(buf, off, buf.length - off, position + off);
    off += bytesWritten;
  }
}
