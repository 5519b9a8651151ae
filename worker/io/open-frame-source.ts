/**
 * Streams samples from a recording on disk as float64, in element order, through one reused
 * read buffer: memory stays at `bufferBytes` whatever the file size, and any frame range can be
 * read directly (resume from a checkpoint, train on a separate time range).
 */
import { open, type FileHandle } from 'node:fs/promises';
import { bytesPerFrame, type RecordingDescription } from '../../shared/formats/recording-description.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { buildElementRouting, type ElementRouting, type FrameSourceOptions } from './element-routing.js';
import type { FrameSource } from './frame-source.js';
import { SampleDecoder } from './sample-decoder.js';

export const DEFAULT_READ_BUFFER_BYTES = 8 * 1024 * 1024;
/** Frames per tile when de-interleaving: a tile of source stays in the L2 cache while every channel is pulled out of it. */
const TILE_FRAMES = 1024;

export interface OpenedFrameSource extends FrameSource {
  /** Delivered channel o is array element elements[o]. */
  readonly elements: readonly number[];
}

export async function openFrameSource(path: string, description: RecordingDescription, options: FrameSourceOptions = {}): Promise<OpenedFrameSource> {
  const routing = buildElementRouting(description, options);
  const fh = await open(path, 'r');
  try {
    const { size } = await fh.stat();
    const end = description.dataOffset + description.dataBytes;
    if (size < end) {
      throw new RecordingFormatError(description.fileName, size, '(data file)', `the file on disk is ${size} bytes but its header places samples up to byte ${end}: it was truncated after inspection`, 'Upload or copy the complete file again.');
    }
    return new DiskFrameSource(fh, description, routing, options.bufferBytes ?? DEFAULT_READ_BUFFER_BYTES);
  } catch (e) {
    await fh.close();
    throw e;
  }
}

class DiskFrameSource implements OpenedFrameSource {
  readonly sampleRate: number;
  readonly channels: number;
  readonly complex: boolean;
  readonly centerFrequencyHz: number;
  readonly totalFrames: number;
  readonly elements: readonly number[];
  private readonly frameBytes: number;
  private readonly components: number;
  private readonly buffer: Buffer;
  private readonly decoder: SampleDecoder;
  /** Reads share one buffer, so they run one after another. */
  private queue: Promise<unknown> = Promise.resolve();
  private closed = false;

  constructor(
    private readonly fh: FileHandle,
    private readonly d: RecordingDescription,
    private readonly routing: ElementRouting,
    bufferBytes: number,
  ) {
    this.sampleRate = d.sampleRate;
    this.channels = routing.fileChannel.length;
    this.complex = d.complex;
    this.centerFrequencyHz = d.centerFrequencyHz;
    this.totalFrames = d.frames;
    this.elements = Array.from(routing.element);
    this.frameBytes = bytesPerFrame(d);
    this.components = d.complex ? 2 : 1;
    const minimum = d.layout === 'interleaved' ? this.frameBytes : this.components * 8;
    // allocUnsafeSlow: its own ArrayBuffer at offset 0, so typed views line up with samples.
    this.buffer = Buffer.allocUnsafeSlow(Math.max(minimum, Math.floor(bufferBytes / 8) * 8));
    this.decoder = new SampleDecoder(this.buffer, d.encoding, d.littleEndian);
  }

  read(start: number, count: number, out: Float64Array[]): Promise<number> {
    const run = this.queue.then(() => this.readNow(start, count, out));
    this.queue = run.catch(() => undefined);
    return run;
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await this.queue;
    await this.fh.close();
  }

  private async readNow(start: number, count: number, out: Float64Array[]): Promise<number> {
    if (this.closed) throw new Error('This frame source is closed; open the recording again.');
    if (!Number.isSafeInteger(start) || start < 0) throw new RangeError(`start frame must be a whole number from 0, got ${start}`);
    if (!Number.isSafeInteger(count) || count < 0) throw new RangeError(`frame count must be a whole number from 0, got ${count}`);
    if (out.length < this.channels) throw new RangeError(`${this.channels} output arrays are needed (one per delivered channel), got ${out.length}`);
    const frames = Math.max(0, Math.min(count, this.totalFrames - start));
    const need = frames * this.components;
    for (let o = 0; o < this.channels; o++) {
      if (out[o].length < need) throw new RangeError(`output array ${o} holds ${out[o].length} values but ${need} are needed for ${frames} ${this.complex ? 'complex ' : ''}frames`);
    }
    if (frames === 0) return 0;
    if (this.d.layout === 'interleaved') await this.readInterleaved(start, frames, out);
    else await this.readPlanar(start, frames, out);
    return frames;
  }

  private async readInterleaved(start: number, frames: number, out: Float64Array[]): Promise<void> {
    const fb = this.frameBytes;
    const perChunk = Math.floor(this.buffer.length / fb);
    const comps = this.components;
    const stride = this.d.channels * comps;
    const { fileChannel, gain } = this.routing;
    for (let done = 0; done < frames; ) {
      const n = Math.min(perChunk, frames - done);
      await this.fill(this.d.dataOffset + (start + done) * fb, n * fb);
      for (let t = 0; t < n; t += TILE_FRAMES) {
        const tn = Math.min(TILE_FRAMES, n - t);
        for (let o = 0; o < fileChannel.length; o++) {
          const first = t * stride + fileChannel[o] * comps;
          const dstIndex = (done + t) * comps;
          this.decoder.decodeRun(first, stride, tn, gain[o], out[o], dstIndex, comps);
          if (comps === 2) this.decoder.decodeRun(first + 1, stride, tn, gain[o], out[o], dstIndex + 1, 2);
        }
      }
      done += n;
    }
  }

  private async readPlanar(start: number, frames: number, out: Float64Array[]): Promise<void> {
    const comps = this.components;
    const sampleBytes = this.decoder.componentBytes * comps;
    const perChunk = Math.floor(this.buffer.length / sampleBytes);
    const { fileChannel, gain } = this.routing;
    for (let o = 0; o < fileChannel.length; o++) {
      const base = this.d.dataOffset + fileChannel[o] * this.d.frames * sampleBytes;
      for (let done = 0; done < frames; ) {
        const n = Math.min(perChunk, frames - done);
        await this.fill(base + (start + done) * sampleBytes, n * sampleBytes);
        this.decoder.decodeRun(0, comps, n, gain[o], out[o], done * comps, comps);
        if (comps === 2) this.decoder.decodeRun(1, 2, n, gain[o], out[o], done * 2 + 1, 2);
        done += n;
      }
    }
  }

  /** Reads exactly `length` bytes at `position` into the start of the buffer. */
  private async fill(position: number, length: number): Promise<void> {
    let got = 0;
    while (got < length) {
      const { bytesRead } = await this.fh.read(this.buffer, got, length - got, position + got);
      if (bytesRead === 0) {
        throw new RecordingFormatError(this.d.fileName, position + got, '(data file)', `the file ended at byte ${position + got} while reading samples`, 'The file was truncated or replaced after inspection; upload it again.');
      }
      got += bytesRead;
    }
  }
}
