/**
 * Streams generated blocks to disk in one of Nullsmith's input formats: WAV or RF64
 * (interleaved, header first), SigMF (.sigmf-data + .sigmf-meta with sha512), or raw binary
 * (interleaved or planar) with a JSON side file. One reused encode buffer per writer.
 */
import { createHash, type Hash } from 'node:crypto';
import { closeSync, openSync, writeSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { RawSidecar } from '../../shared/formats/raw-sidecar.js';
import { datatypeOf } from '../../shared/formats/sample-encoding.js';
import { SampleEncoder, type WritableEncoding } from './sample-encoder.js';
import { buildWavHeader, RIFF_MAX_FILE_BYTES, wavDataBytes } from './wav-header-writer.js';

export type OutputFormat = 'wav' | 'rf64' | 'sigmf' | 'raw';

export interface WriterSpec {
  format: OutputFormat;
  dir: string;
  baseName: string;
  channels: number;
  sampleRate: number;
  complex: boolean;
  centerFrequencyHz: number;
  encoding: WritableEncoding;
  frames: number;
  blockFrames: number;
  /** Raw only. */
  layout?: 'interleaved' | 'planar';
  /** Element positions for the side files (metres, Nullsmith frame). */
  positionsM: Array<[number, number, number]>;
  startTimeUtc: string;
  description: string;
  /** SigMF annotations describing the scene (optional). */
  annotations?: Array<Record<string, unknown>>;
}

export interface WrittenRecording {
  files: string[];
  format: OutputFormat;
  clippedValues: number;
  bytes: number;
}

export class RecordingWriter {
  private readonly fd: number;
  private readonly encoder: SampleEncoder;
  private readonly hash: Hash | null;
  private readonly dataPath: string;
  private readonly dataOffset: number;
  private readonly format: OutputFormat;
  private framesWritten = 0;
  private bytesWritten = 0;

  constructor(private readonly spec: WriterSpec) {
    this.format = spec.format;
    if (this.format === 'wav' && wavDataBytes({ ...spec, container: 'wav' }) + 100 > RIFF_MAX_FILE_BYTES) this.format = 'rf64';
    if (spec.complex && (this.format === 'wav' || this.format === 'rf64')) throw new Error('Complex baseband cannot be stored in WAV; use --format sigmf or raw.');
    if (spec.encoding === 'i24' && (this.format === 'sigmf' || this.format === 'raw')) throw new Error('SigMF datatypes have no 24-bit integer; use --bits 16, 32 or f32.');
    const ext = this.format === 'sigmf' ? '.sigmf-data' : this.format === 'raw' ? '.raw' : '.wav';
    this.dataPath = join(spec.dir, spec.baseName + ext);
    this.fd = openSync(this.dataPath, 'w');
    const comps = spec.complex ? 2 : 1;
    this.encoder = new SampleEncoder(Buffer.allocUnsafeSlow(spec.blockFrames * spec.channels * comps * 4), spec.encoding);
    this.hash = this.format === 'sigmf' ? createHash('sha512') : null;
    if (this.format === 'wav' || this.format === 'rf64') {
      const header = buildWavHeader({ container: this.format, channels: spec.channels, sampleRate: spec.sampleRate, encoding: spec.encoding, frames: spec.frames });
      this.writeBytes(header, 0);
      this.dataOffset = header.length;
    } else {
      this.dataOffset = 0;
    }
  }

  get dataFile(): string {
    return this.dataPath;
  }

  /** Appends `frames` frames from planar blocks (complex: re/im interleaved per channel). */
  write(block: Float64Array[], frames: number): void {
    const { channels } = this.spec;
    const comps = this.spec.complex ? 2 : 1;
    const enc = this.encoder;
    const planar = this.format === 'raw' && this.spec.layout === 'planar';
    if (!planar) {
      const stride = channels * comps;
      for (let c = 0; c < channels; c++) {
        for (let k = 0; k < comps; k++) enc.encodeRun(block[c], k, comps, frames, c * comps + k, stride);
      }
      this.writeBytes(enc.buffer.subarray(0, frames * stride * enc.bytes), this.dataOffset + this.framesWritten * stride * enc.bytes);
    } else {
      const perChannelBytes = this.spec.frames * comps * enc.bytes;
      for (let c = 0; c < channels; c++) {
        enc.encodeRun(block[c], 0, 1, frames * comps, 0, 1);
        this.writeBytes(enc.buffer.subarray(0, frames * comps * enc.bytes), c * perChannelBytes + this.framesWritten * comps * enc.bytes);
      }
    }
    this.framesWritten += frames;
  }

  close(): WrittenRecording {
    const s = this.spec;
    if (this.framesWritten !== s.frames) throw new Error(`wrote ${this.framesWritten} of ${s.frames} frames`);
    const files = [this.dataPath];
    const dataBytes = s.frames * s.channels * (s.complex ? 2 : 1) * this.encoder.bytes;
    if ((this.format === 'wav' || this.format === 'rf64') && dataBytes % 2 === 1) this.writeBytes(new Uint8Array(1), this.dataOffset + dataBytes);
    closeSync(this.fd);
    const datatype = datatypeOf(s.complex, s.encoding, true);
    if (this.format === 'sigmf') {
      const metaPath = join(s.dir, `${s.baseName}.sigmf-meta`);
      const meta = {
        global: {
          'core:datatype': datatype,
          'core:version': '1.2.0',
          'core:sample_rate': s.sampleRate,
          'core:num_channels': s.channels,
          'core:sha512': (this.hash as Hash).digest('hex'),
          'core:description': s.description,
          'core:recorder': 'Nullsmith scenario generator',
          'core:extensions': [{ name: 'spatial', version: '1.1.0', optional: true }],
          'spatial:num_elements': s.channels,
          'spatial:channel_index': 0,
        },
        captures: [
          {
            'core:sample_start': 0,
            ...(s.complex ? { 'core:frequency': s.centerFrequencyHz } : {}),
            'core:datetime': s.startTimeUtc,
            // SigMF spatial frame: boresight +x, line array along y (see shared/formats/sigmf-meta.ts).
            'spatial:element_geometry': s.positionsM.map(([x, y, z]) => ({ point: [y, x === 0 ? 0 : -x, z] })),
          },
        ],
        annotations: s.annotations ?? [],
      };
      writeFileSync(metaPath, JSON.stringify(meta, null, 2) + '\n');
      files.push(metaPath);
    } else if (this.format === 'raw') {
      const sidePath = `${this.dataPath}.json`;
      const side: RawSidecar = {
        sample_rate: s.sampleRate,
        num_channels: s.channels,
        datatype,
        header_bytes: 0,
        layout: s.layout ?? 'interleaved',
        ...(s.complex ? { center_frequency: s.centerFrequencyHz } : {}),
        element_positions_m: s.positionsM,
        start_time_utc: s.startTimeUtc,
        scale: 1,
        notes: s.description,
      };
      writeFileSync(sidePath, JSON.stringify(side, null, 2) + '\n');
      files.push(sidePath);
    }
    return { files, format: this.format, clippedValues: this.encoder.clipped, bytes: this.bytesWritten };
  }

  private writeBytes(bytes: Uint8Array, position: number): void {
    this.hash?.update(bytes);
    let done = 0;
    while (done < bytes.length) done += writeSync(this.fd, bytes, done, bytes.length - done, position + done);
    this.bytesWritten += bytes.length;
  }
}
