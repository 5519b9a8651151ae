/**
 * Appends fixed-size float32 window records to windows.f32. Window j is written at byte
 * j·bytesPerWindow, so a resumed job overwrites exactly the records past its checkpoint and a
 * reader never needs an index. `flush` fsyncs: a checkpoint may be reported only after it.
 */
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { WindowResult } from '../dsp/window-engine.types.js';
import { packWindowResult, type RecordLayout } from './record-layout.js';
import { RECORDS_FILE, ResultFilesError, readHeader } from './result-header.js';

if (os.endianness() !== 'LE') {
  // Records are little-endian float32 written straight from a Float32Array.
  throw new Error('Nullsmith result files are little-endian; this machine is big-endian and is not supported.');
}

export class ResultWriter {
  private readonly record: Float32Array;
  private readonly bytes: Uint8Array;
  private written = -1;

  private constructor(
    private readonly fh: fs.FileHandle,
    private readonly layout: RecordLayout,
  ) {
    this.record = new Float32Array(layout.floatsPerWindow);
    this.bytes = new Uint8Array(this.record.buffer);
  }

  /**
   * Opens windows.f32 in `dir` for writing from window `fromWindow` on. Records before it must
   * already be there (truncateToCheckpoint makes sure nothing lies past it).
   */
  static async open(dir: string, layout: RecordLayout, fromWindow: number): Promise<ResultWriter> {
    const file = path.join(dir, RECORDS_FILE);
    const fh = await fs.open(file, fromWindow === 0 ? 'w' : 'r+').catch((e: NodeJS.ErrnoException) => {
      if (e.code === 'ENOENT') throw new ResultFilesError(`cannot resume at window ${fromWindow}: ${file} does not exist`);
      throw e;
    });
    const { size } = await fh.stat();
    if (size !== fromWindow * layout.bytesPerWindow) {
      await fh.close();
      throw new ResultFilesError(`cannot resume at window ${fromWindow}: ${file} holds ${size} bytes, expected ${fromWindow * layout.bytesPerWindow} (${fromWindow} whole records); truncate to the checkpoint first`);
    }
    const w = new ResultWriter(fh, layout);
    w.written = fromWindow - 1;
    return w;
  }

  /** Last window written (not necessarily flushed); −1 before any. */
  get lastWritten(): number {
    return this.written;
  }

  /** Writes window j's record. Windows must arrive in order. */
  async append(j: number, result: WindowResult): Promise<void> {
    if (j !== this.written + 1) throw new RangeError(`window ${j} written out of order (next expected ${this.written + 1})`);
    packWindowResult(this.layout, result, this.record);
    const n = this.bytes.byteLength;
    let done = 0;
    while (done < n) {
      const { bytesWritten } = await this.fh.write(this.bytes, done, n - done, j * n + done);
      done += bytesWritten;
    }
    this.written = j;
  }

  /** Makes every record written so far durable (fdatasync). */
  async flush(): Promise<void> {
    await this.fh.datasync();
  }

  async close(): Promise<void> {
    await this.fh.close();
  }
}

/**
 * Discards every record after `lastWindow` (−1 keeps nothing), before a job resumes from its
 * last committed checkpoint. Returns the window to resume from (lastWindow + 1).
 */
export async function truncateToCheckpoint(dir: string, lastWindow: number): Promise<number> {
  const { bytesPerWindow } = (await readHeader(dir)).records;
  if (!Number.isInteger(lastWindow) || lastWindow < -1) throw new RangeError(`checkpoint window must be an integer ≥ −1, got ${lastWindow}`);
  const file = path.join(dir, RECORDS_FILE);
  const keep = (lastWindow + 1) * bytesPerWindow;
  let size = 0;
  try {
    size = (await fs.stat(file)).size;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
    if (keep === 0) return 0;
    throw new ResultFilesError(`checkpoint says window ${lastWindow} is stored, but ${file} does not exist; restart the job from the beginning`);
  }
  if (size < keep) {
    throw new ResultFilesError(`checkpoint says window ${lastWindow} is stored, but ${file} holds only ${Math.floor(size / bytesPerWindow)} whole records; restart the job from the beginning`);
  }
  if (size > keep) {
    const fh = await fs.open(file, 'r+');
    try {
      await fh.truncate(keep);
      await fh.datasync();
    } finally {
      await fh.close();
    }
  }
  return lastWindow + 1;
}
