/**
 * Tells which of Nullsmith's inputs a file is, from its first bytes first and its name second,
 * and names the common formats it cannot read so the user knows what to convert.
 */
import { RecordingFormatError } from './recording-format-error.js';

export type DetectedFileKind =
  /** RIFF/WAVE: parse with parseWavHeader. */
  | 'wav'
  /** RF64 or BW64: parse with parseWavHeader. */
  | 'rf64'
  /** SigMF metadata: parse with parseSigmfMeta, together with the .sigmf-data size. */
  | 'sigmf-meta'
  /** SigMF samples: needs its .sigmf-meta. */
  | 'sigmf-data'
  /** Nullsmith raw side file: parse with parseRawSidecar, together with the data file size. */
  | 'raw-sidecar'
  /** Headerless samples: needs a raw side file. */
  | 'raw-data';

const FOREIGN: ReadonlyArray<{ magic: number[]; what: string }> = [
  { magic: [0x66, 0x4c, 0x61, 0x43], what: 'FLAC audio' },
  { magic: [0x4f, 0x67, 0x67, 0x53], what: 'an Ogg stream' },
  { magic: [0x49, 0x44, 0x33], what: 'MP3 audio' },
  { magic: [0x46, 0x4f, 0x52, 0x4d], what: 'an AIFF/IFF file' },
  { magic: [0x89, 0x48, 0x44, 0x46], what: 'an HDF5 file' },
  { magic: [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59], what: 'a NumPy .npy array' },
  { magic: [0x4d, 0x41, 0x54, 0x4c, 0x41, 0x42], what: 'a MATLAB .mat file' },
  { magic: [0x50, 0x4b, 0x03, 0x04], what: 'a ZIP archive' },
  { magic: [0x1f, 0x8b], what: 'a gzip archive' },
  { magic: [0x52, 0x49, 0x46, 0x58], what: 'a big-endian RIFX WAV' },
];

export function detectFormat(fileName: string, firstBytes: Uint8Array): DetectedFileKind {
  const name = fileName.toLowerCase();
  const b = firstBytes;
  const tag = b.length >= 4 ? String.fromCharCode(b[0], b[1], b[2], b[3]) : '';
  if (tag === 'RIFF') return 'wav';
  if (tag === 'RF64' || tag === 'BW64') return 'rf64';
  for (const f of FOREIGN) {
    if (f.magic.length <= b.length && f.magic.every((m, i) => b[i] === m)) {
      throw new RecordingFormatError(fileName, 0, '(file)', `the file is ${f.what}, which Nullsmith does not read`, 'Convert the recording to WAV/RF64 (PCM or float), SigMF, or raw binary with a Nullsmith side file.');
    }
  }
  if (name.endsWith('.sigmf-meta')) return 'sigmf-meta';
  if (name.endsWith('.sigmf-data')) return 'sigmf-data';
  if (name.endsWith('.sigmf-collection')) {
    throw new RecordingFormatError(fileName, null, '(file)', 'the file is a SigMF Collection (one Recording per channel)', 'Interleave the channels into one SigMF Recording and upload its .sigmf-meta and .sigmf-data.');
  }
  if (name.endsWith('.sigmf')) {
    throw new RecordingFormatError(fileName, 0, '(file)', 'the file is a SigMF archive (.sigmf tar)', 'Unpack it and upload the .sigmf-meta and .sigmf-data files.');
  }
  if (name.endsWith('.json') || looksLikeJson(b)) {
    const head = new TextDecoder('utf-8', { fatal: false }).decode(b.subarray(0, Math.min(b.length, 65536)));
    if (/"global"\s*:/.test(head) || /"core:datatype"/.test(head)) return 'sigmf-meta';
    if (/"datatype"\s*:/.test(head) || /"sample_rate"\s*:/.test(head)) return 'raw-sidecar';
    if (name.endsWith('.json')) {
      throw new RecordingFormatError(fileName, null, '(file)', 'this JSON file is neither SigMF metadata nor a Nullsmith raw side file', 'Upload a .sigmf-meta file, or a side file with sample_rate, num_channels and datatype.');
    }
  }
  if (/\.(wav|wave|bwf|rf64|w64)$/.test(name)) {
    throw new RecordingFormatError(fileName, 0, 'RIFF.id', `the file is named like a WAV file but starts with ${tag ? JSON.stringify(tag) : 'too few bytes'}, not "RIFF", "RF64" or "BW64"`, 'The file is damaged or mislabelled; export it again as WAV.');
  }
  if (/\.(raw|bin|dat|pcm|iq|cs16|cf32|cs8|cu8|s16|f32)$/.test(name)) return 'raw-data';
  throw new RecordingFormatError(fileName, 0, '(file)', 'the file type is not recognised from its first bytes or its name', 'Upload WAV/RF64 (.wav), SigMF (.sigmf-meta + .sigmf-data), or raw binary (.raw/.bin) with a JSON side file.');
}

function looksLikeJson(b: Uint8Array): boolean {
  for (let i = 0; i < b.length && i < 64; i++) {
    const c = b[i];
    if (c === 0x20 || c === 0x0a || c === 0x0d || c === 0x09 || c === 0xef || c === 0xbb || c === 0xbf) continue;
    return c === 0x7b;
  }
  return false;
}
