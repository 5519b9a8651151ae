/**
 * The disk edge of the header parsers: reads what each format needs (the first bytes of a
 * WAV/RF64, or the side-file text plus the data file's size) and hands it to shared/formats.
 */
import { open, readFile, stat } from 'node:fs/promises';
import { basename } from 'node:path';
import { HEADER_PROBE_BYTES } from '../../shared/formats/limits.js';
import type { RecordingDescription } from '../../shared/formats/recording-description.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { parseRawSidecar } from '../../shared/formats/raw-sidecar.js';
import { parseSigmfMeta } from '../../shared/formats/sigmf-meta.js';
import { parseWavHeader } from '../../shared/formats/wav-header.js';

/**
 * WAV/RF64: pass only `dataPath`. SigMF and raw: pass the side file's text (or path) as well.
 * Retries with a longer prefix when a WAV header continues past the first MiB (large chunks
 * before `data`).
 */
export async function readRecordingDescription(
  format: RecordingDescription['format'],
  dataPath: string,
  sidecar?: { text?: string; path?: string },
): Promise<RecordingDescription> {
  const { size } = await stat(dataPath);
  if (format === 'wav' || format === 'rf64') {
    let probe = Math.min(size, HEADER_PROBE_BYTES);
    const fh = await open(dataPath, 'r');
    try {
      for (let attempt = 0; attempt < 8; attempt++) {
        const bytes = Buffer.alloc(probe);
        const { bytesRead } = await fh.read(bytes, 0, probe, 0);
        try {
          return parseWavHeader(bytes.subarray(0, bytesRead), size, basename(dataPath));
        } catch (e) {
          if (!(e instanceof RecordingFormatError) || e.bytesNeeded === undefined || e.bytesNeeded <= probe || e.bytesNeeded > 64 * HEADER_PROBE_BYTES) throw e;
          probe = Math.min(size, e.bytesNeeded + 4096);
        }
      }
      throw new RecordingFormatError(basename(dataPath), null, '(header)', 'the chunks before the samples are too long to search', 'Re-export the file with its fmt and data chunks near the start.');
    } finally {
      await fh.close();
    }
  }
  const name = sidecar?.path ? basename(sidecar.path) : basename(dataPath);
  let text = sidecar?.text;
  if (text === undefined) {
    if (!sidecar?.path) throw new RecordingFormatError(name, null, '(side file)', `a ${format} recording needs its ${format === 'sigmf' ? '.sigmf-meta' : 'JSON side'} file`, 'Provide the side file together with the data file.');
    text = await readFile(sidecar.path, 'utf8');
  }
  return format === 'sigmf' ? parseSigmfMeta(text, size, name) : parseRawSidecar(text, size, name);
}
