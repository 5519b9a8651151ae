/**
 * RIFF/WAVE and RF64/BW64 header parser: bytes in, RecordingDescription or a precise
 * RecordingFormatError out. Pure (DataView only) so the browser refuses a bad file before
 * uploading it and the worker trusts the same code.
 *
 * Sources: Microsoft WAVEFORMATEX / WAVEFORMATEXTENSIBLE documentation (chunk layout, format
 * tags, cbSize ≥ 22, KSDATAFORMAT SubFormat GUIDs); EBU Tech 3306 (RF64) and ITU-R BS.2088
 * (BW64) for the ds64 chunk. DOMAIN.md §4 lists what is refused.
 *
 * `bytes` is the start of the file (the browser reads the first HEADER_PROBE_BYTES). Chunks
 * after `data` are inspected only when they fall inside `bytes`.
 */
import { MAX_CHANNELS, MAX_WAV_SAMPLE_RATE_HZ } from './limits.js';
import type { RecordingDescription } from './recording-description.js';
import { RecordingFormatError } from './recording-format-error.js';
import { datatypeOf, type SampleEncoding } from './sample-encoding.js';

const WAVE_FORMAT_PCM = 1;
const WAVE_FORMAT_IEEE_FLOAT = 3;
const WAVE_FORMAT_EXTENSIBLE = 0xfffe;
const SIZE_USE_DS64 = 0xffffffff;
/** Bytes 2..15 of every KSDATAFORMAT_SUBTYPE_* GUID {0000xxxx-0000-0010-8000-00AA00389B71}. */
const KSDATAFORMAT_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];

/** Codes users meet most, so the refusal can name what the file actually holds. */
const KNOWN_CODECS: Readonly<Record<number, string>> = {
  0x0000: 'an unknown format (tag 0)',
  0x0002: 'Microsoft ADPCM',
  0x0006: 'A-law',
  0x0007: 'μ-law',
  0x0011: 'IMA ADPCM',
  0x0016: 'G.723 ADPCM',
  0x0031: 'GSM 6.10',
  0x0040: 'G.721 ADPCM',
  0x0050: 'MPEG audio',
  0x0055: 'MPEG Layer 3 (MP3)',
  0x0092: 'Dolby AC-3',
  0x00ff: 'AAC',
  0x0161: 'Windows Media Audio',
  0x0162: 'Windows Media Audio Pro',
  0x0163: 'Windows Media Audio Lossless',
  0x1610: 'AAC (ADTS)',
  0xf1ac: 'FLAC',
};

interface FmtFacts {
  encoding: SampleEncoding;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  validBits: number;
}

export function parseWavHeader(bytes: Uint8Array, fileSize: number, fileName: string): RecordingDescription {
  return new WavHeaderReader(bytes, fileSize, fileName).read();
}

class WavHeaderReader {
  private readonly view: DataView;
  /** Bytes we can actually look at: the smaller of what was given and the file. */
  private readonly available: number;
  private readonly warnings: string[] = [];

  constructor(
    private readonly bytes: Uint8Array,
    private readonly fileSize: number,
    private readonly fileName: string,
  ) {
    if (!Number.isSafeInteger(fileSize) || fileSize < 0) {
      throw this.fail(null, 'fileSize', `the file size ${String(fileSize)} is not a whole number of bytes`, 'Pass the size of the file in bytes.');
    }
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    this.available = Math.min(bytes.byteLength, fileSize);
  }

  read(): RecordingDescription {
    this.need(12, 'RIFF header');
    const magic = this.fourcc(0);
    if (magic === 'RIFX') {
      throw this.fail(0, 'RIFF.id', `the file is a big-endian "${magic}" WAV`, 'Re-export it as an ordinary little-endian RIFF WAV (or RF64 for files over 4 GiB).');
    }
    if (magic !== 'RIFF' && magic !== 'RF64' && magic !== 'BW64') {
      throw this.fail(0, 'RIFF.id', `the file starts with ${this.showId(0)}, not "RIFF", "RF64" or "BW64": it is not a WAV file`, 'Upload a WAV, RF64, SigMF or raw-binary recording, or pick the matching format.');
    }
    const form = this.fourcc(8);
    if (form !== 'WAVE') {
      throw this.fail(8, 'RIFF.form', `the RIFF form type is ${this.showId(8)}, not "WAVE"`, 'This RIFF file holds something other than audio samples (e.g. AVI). Export the recording as WAV.');
    }
    const isRf64 = magic !== 'RIFF';
    const riffSize32 = this.view.getUint32(4, true);

    let pos = 12;
    let declaredEnd: number;
    let ds64: { dataSize: number; sampleCount: number; table: Map<string, number> } | null = null;
    if (isRf64) {
      this.need(20, 'ds64 chunk header');
      if (this.fourcc(12) !== 'ds64') {
        throw this.fail(12, 'ds64', `${magic} file has no ds64 chunk right after the header (found ${this.showId(12)})`, 'The 64-bit sizes are missing, so the file cannot be read safely. Re-export it as RF64/BW64 with a ds64 chunk, or as WAV if it is under 4 GiB.');
      }
      const ds64Size = this.view.getUint32(16, true);
      if (ds64Size < 28) {
        throw this.fail(16, 'ds64.size', `ds64 chunk is ${ds64Size} bytes, shorter than the 28 its fixed fields need`, 'The file is damaged; re-export it.');
      }
      this.need(20 + 28, 'ds64 chunk');
      const riffSize64 = this.u64(20, 'ds64.riffSize');
      const dataSize = this.u64(28, 'ds64.dataSize');
      const sampleCount = this.u64(36, 'ds64.sampleCount');
      const tableLength = this.view.getUint32(44, true);
      if (28 + 12 * tableLength > ds64Size) {
        throw this.fail(44, 'ds64.tableLength', `ds64 lists ${tableLength} chunk sizes but its ${ds64Size} bytes hold at most ${Math.floor((ds64Size - 28) / 12)}`, 'The file is damaged; re-export it.');
      }
      this.need(20 + 28 + 12 * tableLength, 'ds64 chunk table');
      const table = new Map<string, number>();
      for (let i = 0; i < tableLength; i++) {
        const at = 48 + 12 * i;
        table.set(this.fourcc(at), this.u64(at + 4, `ds64.table[${i}].size`));
      }
      ds64 = { dataSize, sampleCount, table };
      if (riffSize32 !== SIZE_USE_DS64) {
        this.warnings.push(`${magic} header size field is ${riffSize32}, not 0xFFFFFFFF; the ds64 sizes were used.`);
      }
      declaredEnd = riffSize64 + 8;
      pos = 20 + ds64Size + (ds64Size & 1);
    } else {
      declaredEnd = riffSize32 + 8;
      if (riffSize32 === SIZE_USE_DS64) {
        this.warnings.push('RIFF size is 0xFFFFFFFF (the writer did not finish the header); chunk sizes were trusted instead.');
        declaredEnd = this.fileSize;
      }
    }
    if (declaredEnd > this.fileSize) {
      if (declaredEnd - this.fileSize === 1) {
        this.warnings.push('The last pad byte is missing at the end of the file (harmless).');
      } else {
        throw this.fail(isRf64 ? 20 : 4, isRf64 ? 'ds64.riffSize' : 'RIFF.size', `the header says the file is ${declaredEnd} bytes but it is ${this.fileSize} bytes: it is truncated`, 'The upload or copy was cut short. Copy the complete file again; if the recorder stopped abruptly, repair the header sizes or re-export.');
      }
    } else if (declaredEnd < this.fileSize) {
      this.warnings.push(`${this.fileSize - declaredEnd} bytes after the end of the ${magic} form are ignored.`);
    }
    const limit = Math.min(declaredEnd, this.fileSize);

    let fmt: FmtFacts | null = null;
    let data: { offset: number; size: number; headerAt: number } | null = null;
    while (pos + 8 <= limit) {
      if (pos + 8 > this.available) {
        if (fmt && data) break;
        throw this.needMore(pos + 8, pos, `the next chunk header at byte ${pos}`, fmt === null ? 'fmt' : 'data');
      }
      const id = this.fourcc(pos);
      if (!/^[\x20-\x7e]{4}$/.test(id)) {
        if (fmt && data) {
          this.warnings.push(`Bytes after the data chunk (at byte ${pos}) are not a chunk; ignored.`);
          break;
        }
        throw this.fail(pos, 'chunk.id', `the chunk id at byte ${pos} is not text (${this.hex(pos, 4)}), so the chunk list is damaged`, 'Re-export the recording; a repair tool may also rebuild the chunk list.');
      }
      const size32 = this.view.getUint32(pos + 4, true);
      let size = size32;
      if (ds64 && size32 === SIZE_USE_DS64) {
        if (id === 'data') size = ds64.dataSize;
        else if (ds64.table.has(id)) size = ds64.table.get(id) as number;
        else throw this.fail(pos + 4, `${id}.size`, `chunk "${id}" has size 0xFFFFFFFF but ds64 lists no size for it`, 'The file is damaged; re-export it.');
      } else if (ds64 && id === 'data' && ds64.dataSize !== 0 && ds64.dataSize !== size32) {
        throw this.fail(pos + 4, 'data.size', `data chunk says ${size32} bytes but ds64 says ${ds64.dataSize}`, 'The two sizes must agree; re-export the file.');
      }
      const body = pos + 8;
      const end = body + size;
      switch (id) {
        case 'fmt ': {
          if (fmt) throw this.fail(pos, 'fmt', `a second fmt chunk starts at byte ${pos}`, 'A WAV file has exactly one fmt chunk; re-export it.');
          if (data) throw this.fail(pos, 'fmt', `the fmt chunk (byte ${pos}) comes after the data chunk`, 'Samples cannot be interpreted before their format; re-export the file with fmt first.');
          if (size < 16) throw this.fail(pos + 4, 'fmt.size', `fmt chunk is ${size} bytes, shorter than the 16 every WAV format needs`, 'The header is damaged; re-export the file.');
          if (end > limit) throw this.fail(pos + 4, 'fmt.size', `fmt chunk says ${size} bytes but the file ends ${limit - body} bytes after it starts`, 'The file is truncated or damaged; copy or export it again.');
          if (end > this.available) throw this.needMore(end, pos, 'the fmt chunk', 'fmt');
          fmt = this.readFmt(body, size);
          break;
        }
        case 'data': {
          if (data) throw this.fail(pos, 'data', `a second data chunk starts at byte ${pos} (the first is at byte ${data.headerAt})`, 'Nullsmith reads one continuous data chunk; join the takes or export them as separate files.');
          if (!fmt) throw this.fail(pos, 'data', `the data chunk (byte ${pos}) comes before any fmt chunk`, 'Samples cannot be interpreted without their format; re-export the file.');
          if (end > this.fileSize) {
            throw this.fail(pos + 4, 'data.size', `data chunk says ${size} bytes but only ${this.fileSize - body} remain in the file: it is truncated`, 'Copy the complete file again. If the recorder stopped abruptly, repair the data size to the bytes present or re-export.');
          }
          data = { offset: body, size, headerAt: pos };
          break;
        }
        case 'ds64':
          throw this.fail(pos, 'ds64', `a ds64 chunk appears at byte ${pos}; it is only allowed first in an RF64/BW64 file`, 'The file is damaged or wrongly promoted to RF64; re-export it.');
        default:
          if (end > limit) {
            if (fmt && data) {
              this.warnings.push(`Chunk "${id}" at byte ${pos} runs past the end of the file; ignored (the samples are intact).`);
              pos = limit;
              continue;
            }
            throw this.fail(pos + 4, `${id}.size`, `chunk "${id}" at byte ${pos} says ${size} bytes, past the end of the file`, 'The file is truncated or damaged; copy or export it again.');
          }
      }
      pos = end + (size & 1);
    }
    if (pos < limit && pos + 8 > limit && limit - pos > 1) {
      this.warnings.push(`${limit - pos} stray bytes at the end of the chunk list are ignored.`);
    }
    if (!fmt) throw this.fail(12, 'fmt', 'the file has no fmt chunk', 'Without it the samples cannot be interpreted; re-export the recording as WAV.');
    if (!data) throw this.fail(12, 'data', 'the file has no data chunk', 'The file holds no samples; re-export the recording.');
    if (data.size === 0) throw this.fail(data.headerAt + 4, 'data.size', 'the data chunk is empty', 'The recording holds no samples; check the recorder and export again.');
    if (data.size % fmt.blockAlign !== 0) {
      throw this.fail(data.headerAt + 4, 'data.size', `data chunk holds ${data.size} bytes, not a whole number of ${fmt.blockAlign}-byte frames`, 'The recording was cut mid-frame; trim it to whole frames or re-export.');
    }
    const frames = data.size / fmt.blockAlign;
    if (ds64 && ds64.sampleCount !== 0 && ds64.sampleCount !== frames && ds64.sampleCount !== frames * fmt.channels) {
      this.warnings.push(`ds64 sample count ${ds64.sampleCount} does not match the ${frames} frames in the data chunk; the data chunk was trusted.`);
    }
    return {
      format: isRf64 ? 'rf64' : 'wav',
      fileName: this.fileName,
      sampleRate: fmt.sampleRate,
      channels: fmt.channels,
      complex: false,
      encoding: fmt.encoding,
      datatype: datatypeOf(false, fmt.encoding, true),
      validBits: fmt.validBits,
      littleEndian: true,
      dataOffset: data.offset,
      dataBytes: data.size,
      frames,
      layout: 'interleaved',
      centerFrequencyHz: 0,
      scale: 1,
      warnings: this.warnings,
    };
  }

  private readFmt(b: number, size: number): FmtFacts {
    const v = this.view;
    const tag = v.getUint16(b, true);
    const channels = v.getUint16(b + 2, true);
    const sampleRate = v.getUint32(b + 4, true);
    const avgBytes = v.getUint32(b + 8, true);
    const blockAlign = v.getUint16(b + 12, true);
    const bits = v.getUint16(b + 14, true);
    let code = tag;
    let validBits = bits;
    if (tag === WAVE_FORMAT_EXTENSIBLE) {
      if (size < 18) throw this.fail(b + 16, 'fmt.cbSize', `extensible fmt chunk is ${size} bytes and has no cbSize field`, 'WAVE_FORMAT_EXTENSIBLE needs a 40-byte fmt chunk; re-export the file.');
      const cbSize = v.getUint16(b + 16, true);
      if (cbSize < 22) throw this.fail(b + 16, 'fmt.cbSize', `extensible fmt chunk has cbSize ${cbSize}, less than the 22 bytes of extension it needs`, 'The header is damaged; re-export the file.');
      if (size < 40) throw this.fail(b - 4, 'fmt.size', `extensible fmt chunk is ${size} bytes, shorter than 40`, 'The header is damaged; re-export the file.');
      validBits = v.getUint16(b + 18, true);
      const mask = v.getUint32(b + 20, true);
      code = v.getUint16(b + 24, true);
      for (let i = 0; i < KSDATAFORMAT_TAIL.length; i++) {
        if (this.bytes[b + 26 + i] !== KSDATAFORMAT_TAIL[i]) {
          throw this.fail(b + 24, 'fmt.SubFormat', `the SubFormat GUID (${this.hex(b + 24, 16)}) is not a standard PCM or float KSDATAFORMAT GUID (e.g. Ambisonic B-format or a vendor codec)`, 'Export the channels as plain PCM or float WAV.');
        }
      }
      if (mask !== 0 && popcount(mask) !== channels) {
        this.warnings.push(`Speaker mask names ${popcount(mask)} positions for ${channels} channels; speaker positions are ignored (array geometry comes from the array description).`);
      }
    }
    if (code !== WAVE_FORMAT_PCM && code !== WAVE_FORMAT_IEEE_FLOAT) {
      const at = tag === WAVE_FORMAT_EXTENSIBLE ? b + 24 : b;
      const what = KNOWN_CODECS[code] ?? `format code 0x${code.toString(16).padStart(4, '0')}`;
      throw this.fail(at, tag === WAVE_FORMAT_EXTENSIBLE ? 'fmt.SubFormat' : 'fmt.wFormatTag', `the samples are ${what}, not linear PCM or float`, 'Decode or export the recording as PCM (8/16/24/32-bit) or float (32/64-bit) WAV first.');
    }
    if (channels === 0) throw this.fail(b + 2, 'fmt.nChannels', 'fmt chunk says 0 channels; the file is damaged or not a multichannel recording', 'Re-export it with the channel count set.');
    if (channels > MAX_CHANNELS) throw this.fail(b + 2, 'fmt.nChannels', `fmt chunk says ${channels} channels, more than the ${MAX_CHANNELS} Nullsmith accepts`, 'Split the recording into groups of at most 1024 channels.');
    if (sampleRate === 0) throw this.fail(b + 4, 'fmt.nSamplesPerSec', 'fmt chunk says the sample rate is 0 Hz', 'The header is damaged; re-export the file with its real sample rate.');
    if (sampleRate > MAX_WAV_SAMPLE_RATE_HZ) {
      throw this.fail(b + 4, 'fmt.nSamplesPerSec', `fmt chunk says ${sampleRate} samples per second, above the ${MAX_WAV_SAMPLE_RATE_HZ} Hz Nullsmith accepts for WAV`, 'The header is most likely damaged; if the rate is real, store the data as SigMF or raw binary with a side file.');
    }
    let encoding: SampleEncoding;
    if (code === WAVE_FORMAT_PCM) {
      if (bits !== 8 && bits !== 16 && bits !== 24 && bits !== 32) {
        throw this.fail(b + 14, 'fmt.wBitsPerSample', `PCM samples of ${bits} bits are not supported (8, 16, 24 or 32)`, 'Re-export the recording as 16-bit or 24-bit PCM (or 32-bit float).');
      }
      encoding = bits === 8 ? 'u8' : bits === 16 ? 'i16' : bits === 24 ? 'i24' : 'i32';
    } else {
      if (bits !== 32 && bits !== 64) {
        throw this.fail(b + 14, 'fmt.wBitsPerSample', `float samples of ${bits} bits are not supported (32 or 64)`, 'Re-export the recording as 32-bit float or 24-bit PCM.');
      }
      encoding = bits === 32 ? 'f32' : 'f64';
    }
    if (validBits === 0) {
      validBits = bits;
      this.warnings.push('wValidBitsPerSample is 0; the full container width was assumed.');
    } else if (validBits > bits) {
      throw this.fail(b + 18, 'fmt.wValidBitsPerSample', `valid bits per sample (${validBits}) exceed the ${bits}-bit container`, 'The header is damaged; re-export the file.');
    } else if (validBits < bits) {
      this.warnings.push(`Samples carry ${validBits} significant bits in a ${bits}-bit container; they are scaled by the container's full scale.`);
    }
    const expectedAlign = (channels * bits) / 8;
    if (blockAlign !== expectedAlign) {
      throw this.fail(b + 12, 'fmt.nBlockAlign', `nBlockAlign is ${blockAlign} but ${channels} channels × ${bits} bits need ${expectedAlign} bytes per frame`, 'The header is inconsistent; re-export the file.');
    }
    if (avgBytes !== sampleRate * blockAlign) {
      throw this.fail(b + 8, 'fmt.nAvgBytesPerSec', `nAvgBytesPerSec is ${avgBytes} but ${sampleRate} Hz × ${blockAlign} bytes per frame is ${sampleRate * blockAlign}`, 'The header is inconsistent (the sample rate may be wrong); re-export the file.');
    }
    return { encoding, channels, sampleRate, blockAlign, validBits };
  }

  private need(end: number, what: string): void {
    if (end > this.fileSize) {
      throw this.fail(this.fileSize, what, `the file is only ${this.fileSize} bytes and ends inside the ${what}`, 'The file is truncated or not a WAV file; copy or export it again.');
    }
    if (end > this.available) throw this.needMore(end, Math.min(this.available, end), `the ${what}`, what);
  }

  private needMore(bytesNeeded: number, at: number, what: string, field: string): RecordingFormatError {
    return new RecordingFormatError(
      this.fileName,
      at,
      field,
      `the first ${this.available} bytes given end before ${what} (the header continues to byte ${bytesNeeded})`,
      `Read at least ${bytesNeeded} bytes from the start of the file and parse again.`,
      bytesNeeded,
    );
  }

  private fail(at: number | null, field: string, problem: string, remedy: string): RecordingFormatError {
    return new RecordingFormatError(this.fileName, at, field, problem, remedy);
  }

  private u64(at: number, field: string): number {
    const lo = this.view.getUint32(at, true);
    const hi = this.view.getUint32(at + 4, true);
    if (hi >= 0x200000) throw this.fail(at, field, `${field} is larger than 2^53 bytes`, 'The header is damaged; re-export the file.');
    return hi * 0x100000000 + lo;
  }

  private fourcc(at: number): string {
    return String.fromCharCode(this.bytes[at], this.bytes[at + 1], this.bytes[at + 2], this.bytes[at + 3]);
  }

  private showId(at: number): string {
    const id = this.fourcc(at);
    return /^[\x20-\x7e]{4}$/.test(id) ? `"${id}"` : `bytes ${this.hex(at, 4)}`;
  }

  private hex(at: number, n: number): string {
    const out: string[] = [];
    for (let i = 0; i < n && at + i < this.bytes.length; i++) out.push(this.bytes[at + i].toString(16).padStart(2, '0'));
    return out.join(' ');
  }
}

function popcount(x: number): number {
  let n = 0;
  for (let v = x >>> 0; v; v &= v - 1) n++;
  return n;
}
