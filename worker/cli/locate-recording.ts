/**
 * Finds out what a recording path given on the command line is (by its first bytes, then its
 * name, via shared/formats detectFormat) and which files make it up: WAV/RF64 alone, SigMF
 * meta + data, raw data + JSON side file (`name.raw` ↔ `name.raw.json` unless --sidecar).
 */
import fs from 'node:fs/promises';
import path from 'node:path';
import { detectFormat } from '../../shared/formats/detect-format.js';
import type { RecordingDescription } from '../../shared/formats/recording-description.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { readRecordingDescription } from '../io/read-recording-description.js';

export interface LocatedRecording {
  format: RecordingDescription['format'];
  dataPath: string;
  /** SigMF meta or raw side file. */
  sidecarPath?: string;
  description: RecordingDescription;
}

async function firstBytes(file: string): Promise<Uint8Array> {
  const fh = await fs.open(file, 'r').catch((e: NodeJS.ErrnoException) => {
    if (e.code === 'ENOENT') throw new RecordingFormatError(path.basename(file), null, '(file)', `no file at ${file}`, 'Check the path.');
    throw e;
  });
  try {
    const buf = Buffer.alloc(65536);
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

const exists = (p: string) => fs.access(p).then(() => true, () => false);

export async function locateRecording(file: string, sidecar?: string): Promise<LocatedRecording> {
  if (sidecar) {
    const kind = detectFormat(path.basename(sidecar), await firstBytes(sidecar));
    const format = kind === 'sigmf-meta' ? 'sigmf' : 'raw';
    return { format, dataPath: file, sidecarPath: sidecar, description: await readRecordingDescription(format, file, { path: sidecar }) };
  }
  const kind = detectFormat(path.basename(file), await firstBytes(file));
  switch (kind) {
    case 'wav':
    case 'rf64':
      return { format: kind, dataPath: file, description: await readRecordingDescription(kind, file) };
    case 'sigmf-meta':
    case 'sigmf-data': {
      const base = file.replace(/\.sigmf-(meta|data)$/i, '');
      const meta = `${base}.sigmf-meta`;
      const data = `${base}.sigmf-data`;
      for (const p of [meta, data]) {
        if (!(await exists(p))) throw new RecordingFormatError(path.basename(p), null, '(file)', `the SigMF recording needs ${p}, which is missing`, 'Put the .sigmf-meta and .sigmf-data files side by side with the same base name.');
      }
      return { format: 'sigmf', dataPath: data, sidecarPath: meta, description: await readRecordingDescription('sigmf', data, { path: meta }) };
    }
    case 'raw-sidecar': {
      const data = file.replace(/\.json$/i, '');
      if (data === file || !(await exists(data))) {
        throw new RecordingFormatError(path.basename(file), null, '(file)', `the raw side file's data file ${data} is missing`, 'Name the side file after the data file plus ".json" (survey.raw → survey.raw.json), or pass the data file with --sidecar.');
      }
      return { format: 'raw', dataPath: data, sidecarPath: file, description: await readRecordingDescription('raw', data, { path: file }) };
    }
    case 'raw-data': {
      const side = `${file}.json`;
      if (!(await exists(side))) throw new RecordingFormatError(path.basename(file), 0, '(file)', 'this file has no recognisable header and no side file', `Write a raw side file ${path.basename(side)} (sample_rate, num_channels, datatype), or pass one with --sidecar.`);
      return { format: 'raw', dataPath: file, sidecarPath: side, description: await readRecordingDescription('raw', file, { path: side }) };
    }
  }
}
