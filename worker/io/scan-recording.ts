/**
 * One sequential pass over a whole recording file for inspection: sha256 of every byte (and
 * sha512 when the description carries a SigMF core:sha512 to check), and per-channel quality figures (file channel order, full scale = 1.0), in bounded memory with
 * progress. Complex samples count I and Q as separate values in the statistics.
 */
import { createHash } from 'node:crypto';
import { open } from 'node:fs/promises';
import { QC_THRESHOLDS, type ChannelQc } from '../../shared/api/recordings.js';
import { bytesPerFrame, type RecordingDescription } from '../../shared/formats/recording-description.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { DEFAULT_READ_BUFFER_BYTES } from './open-frame-source.js';
import { SampleDecoder } from './sample-decoder.js';

export interface ScanOptions {
  /** Called after every block with the fraction of the file done (0..1). */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
  bufferBytes?: number;
}

export interface ScanResult {
  sha256: string;
  /** sha512 of the whole file, computed only when the description declares one (SigMF core:sha512). */
  sha512?: string;
  fileBytes: number;
  qc: ChannelQc[];
}

interface Accumulator {
  n: number;
  sum: number;
  sumSq: number;
  peak: number;
  min: number;
  max: number;
  clipped: number;
}

export async function scanRecording(path: string, d: RecordingDescription, options: ScanOptions = {}): Promise<ScanResult> {
  const fh = await open(path, 'r');
  try {
    const { size } = await fh.stat();
    const dataEnd = d.dataOffset + d.dataBytes;
    if (size < dataEnd) {
      throw new RecordingFormatError(d.fileName, size, '(data file)', `the file is ${size} bytes but its header places samples up to byte ${dataEnd}: it is truncated`, 'Upload or copy the complete file again.');
    }
    const hash = createHash('sha256');
    const hash512 = d.sha512 ? createHash('sha512') : null;
    const fb = bytesPerFrame(d);
    const bufferBytes = Math.max(fb, Math.floor((options.bufferBytes ?? DEFAULT_READ_BUFFER_BYTES) / fb) * fb);
    const buffer = Buffer.allocUnsafeSlow(bufferBytes);
    const decoder = new SampleDecoder(buffer, d.encoding, d.littleEndian);
    const comps = d.complex ? 2 : 1;
    const scratch = new Float64Array(Math.floor(bufferBytes / decoder.componentBytes));
    const acc: Accumulator[] = Array.from({ length: d.channels }, () => ({ n: 0, sum: 0, sumSq: 0, peak: 0, min: Infinity, max: -Infinity, clipped: 0 }));
    const clipAt = d.encoding === 'f32' || d.encoding === 'f64' ? 1 : QC_THRESHOLDS.clipFraction;
    let position = 0;

    const pass = async (endAt: number, onBytes: ((bytes: number, at: number) => void) | null): Promise<void> => {
      while (position < endAt) {
        if (options.signal?.aborted) throw options.signal.reason ?? new Error('Scan cancelled.');
        const n = Math.min(bufferBytes, endAt - position);
        let got = 0;
        while (got < n) {
          const { bytesRead } = await fh.read(buffer, got, n - got, position + got);
          if (bytesRead === 0) throw new RecordingFormatError(d.fileName, position + got, '(data file)', `the file ended at byte ${position + got} during the scan`, 'The file changed while being inspected; upload it again.');
          got += bytesRead;
        }
        hash.update(buffer.subarray(0, n));
        hash512?.update(buffer.subarray(0, n));
        onBytes?.(n, position);
        position += n;
        options.onProgress?.(size === 0 ? 1 : position / size);
      }
    };

    await pass(d.dataOffset, null);
    await pass(dataEnd, (n, at) => {
      const values = n / decoder.componentBytes;
      if (d.layout === 'interleaved') {
        const perFrame = d.channels * comps;
        const frames = values / perFrame;
        for (let c = 0; c < d.channels; c++) {
          for (let k = 0; k < comps; k++) {
            decoder.decodeRun(c * comps + k, perFrame, frames, 1, scratch, 0, 1);
            accumulate(acc[c], scratch, frames, clipAt);
          }
        }
      } else {
        // Planar: this block may span the end of one channel and the start of the next.
        const perChannel = d.frames * comps;
        let v = (at - d.dataOffset) / decoder.componentBytes;
        let offset = 0;
        while (offset < values) {
          const c = Math.floor(v / perChannel);
          const run = Math.min(values - offset, (c + 1) * perChannel - v);
          decoder.decodeRun(offset, 1, run, 1, scratch, 0, 1);
          accumulate(acc[c], scratch, run, clipAt);
          offset += run;
          v += run;
        }
      }
    });
    await pass(size, null);
    options.onProgress?.(1);
    return {
      sha256: hash.digest('hex'),
      ...(hash512 ? { sha512: hash512.digest('hex') } : {}),
      fileBytes: size,
      qc: acc.map((a, channel) => {
        const mean = a.n ? a.sum / a.n : 0;
        const rms = a.n ? Math.sqrt(a.sumSq / a.n) : 0;
        return { channel, rms, peak: a.peak, clipped: a.clipped, dcOffset: mean, dead: rms < QC_THRESHOLDS.deadRms, flat: a.n === 0 || a.min === a.max };
      }),
    };
  } finally {
    await fh.close();
  }
}

function accumulate(a: Accumulator, x: Float64Array, n: number, clipAt: number): void {
  let sum = 0;
  let sumSq = 0;
  let peak = a.peak;
  let min = a.min;
  let max = a.max;
  let clipped = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    sum += v;
    sumSq += v * v;
    const m = v < 0 ? -v : v;
    if (m > peak) peak = m;
    if (m >= clipAt) clipped++;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  a.n += n;
  a.sum += sum;
  a.sumSq += sumSq;
  a.peak = peak;
  a.min = min;
  a.max = max;
  a.clipped += clipped;
}
