/**
 * Random access to stored window records: header, number of complete windows, and any slice
 * of a window's record read straight from its offset (positional reads, nothing else loaded).
 */
import fs from 'node:fs/promises';
import path from 'node:path';
import { windowSpanS } from '../../shared/params/job-layout.js';
import { fieldOf, type RecordField, type RecordFieldName } from './record-layout.js';
import { RECORDS_FILE, ResultFilesError, readHeader, type ResultHeader } from './result-header.js';

export class ResultReader {
  private constructor(
    readonly dir: string,
    readonly header: ResultHeader,
    private readonly fh: fs.FileHandle | null,
    /** Whole records present when the reader was opened. */
    readonly windowsStored: number,
  ) {}

  static async open(dir: string): Promise<ResultReader> {
    const header = await readHeader(dir);
    const file = path.join(dir, header.records.file ?? RECORDS_FILE);
    let fh: fs.FileHandle;
    try {
      fh = await fs.open(file, 'r');
    } catch (e) {
      // A job that has not written its first window yet: a header and no records.
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return new ResultReader(dir, header, null, 0);
      throw e;
    }
    const { size } = await fh.stat();
    return new ResultReader(dir, header, fh, Math.floor(size / header.records.bytesPerWindow));
  }

  field(name: RecordFieldName): RecordField {
    return fieldOf(this.header.records, name);
  }

  /** Time span of window j (seconds from the recording's first sample). */
  span(j: number): { startS: number; endS: number } {
    return windowSpanS(j, this.header.timing);
  }

  /**
   * Reads `count` floats starting `offset` floats into window j's record into `out`
   * (a caller-owned Float32Array, reused between calls).
   */
  async readSlice(j: number, offset: number, count: number, out: Float32Array): Promise<void> {
    if (j < 0 || j >= this.windowsStored || !this.fh) throw new ResultFilesError(`window ${j} is not stored (windows 0..${this.windowsStored - 1} are)`);
    if (out.length < count) throw new RangeError(`buffer of ${out.length} floats cannot hold ${count}`);
    const bytes = new Uint8Array(out.buffer, out.byteOffset, count * 4);
    const position = j * this.header.records.bytesPerWindow + offset * 4;
    let done = 0;
    while (done < bytes.byteLength) {
      const { bytesRead } = await this.fh.read(bytes, done, bytes.byteLength - done, position + done);
      if (bytesRead === 0) throw new ResultFilesError(`${RECORDS_FILE} ended inside window ${j}; the result files are damaged`);
      done += bytesRead;
    }
  }

  /** Reads a whole record of window j into `out` (length ≥ floatsPerWindow). */
  async readWindow(j: number, out: Float32Array): Promise<void> {
    await this.readSlice(j, 0, this.header.records.floatsPerWindow, out);
  }

  private closed = false;

  /** Idempotent: streams close their reader both when they end and when they are destroyed. */
  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await this.fh?.close();
  }
}
