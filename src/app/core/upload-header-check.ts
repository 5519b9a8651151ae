import { detectFormat } from '../../../shared/formats/detect-format';
import { HEADER_PROBE_BYTES } from '../../../shared/formats/limits';
import { parseRawSidecar } from '../../../shared/formats/raw-sidecar';
import { RecordingFormatError } from '../../../shared/formats/recording-format-error';
import { parseSigmfMeta } from '../../../shared/formats/sigmf-meta';
import { parseWavHeader } from '../../../shared/formats/wav-header';
import type { RecordingFormat } from '../../../shared/api/recordings';

/** A data file ready to upload: its format, and its side file for SigMF and raw. */
export interface CheckedUpload {
  data: File;
  format: RecordingFormat;
  sidecar?: { name: string; text: string };
  /** One line for the upload list, e.g. "16 ch · 48000 Hz · 12.5 s". */
  summary: string;
}

/** A file refused before sending a byte, with the parser's reason. */
export interface RefusedFile {
  name: string;
  reason: string;
}

/**
 * Runs the shared header parsers on picked files before any byte is sent. Side files are
 * paired with their data files by name (x.sigmf-meta + x.sigmf-data; x.raw + x.raw.json or x.json).
 */
export async function checkPickedFiles(files: File[]): Promise<{ ok: CheckedUpload[]; refused: RefusedFile[] }> {
  const ok: CheckedUpload[] = [];
  const refused: RefusedFile[] = [];
  const byName = new Map(files.map((f) => [f.name, f]));
  const used = new Set<string>();
  for (const f of files) {
    if (used.has(f.name)) continue;
    try {
      const head = new Uint8Array(await f.slice(0, Math.min(f.size, HEADER_PROBE_BYTES)).arrayBuffer());
      const kind = detectFormat(f.name, head);
      if (kind === 'wav' || kind === 'rf64') {
        const d = parseWavHeader(head, f.size, f.name);
        ok.push({ data: f, format: kind, summary: `${d.channels} ch · ${d.sampleRate} Hz · ${(d.frames / d.sampleRate).toFixed(1)} s` });
      } else if (kind === 'sigmf-meta' || kind === 'raw-sidecar') {
        continue; // handled with its data file
      } else {
        const sigmf = kind === 'sigmf-data';
        const sideNames = sigmf ? [f.name.replace(/\.sigmf-data$/i, '.sigmf-meta')] : [`${f.name}.json`, f.name.replace(/\.[^.]+$/, '.json')];
        const side = sideNames.map((n) => byName.get(n)).find((x) => x);
        if (!side) throw new Error(`${f.name} needs its side file (${sideNames[0]}); pick both files together.`);
        const text = await side.text();
        const d = sigmf ? parseSigmfMeta(text, f.size, side.name) : parseRawSidecar(text, f.size, side.name);
        used.add(side.name);
        ok.push({ data: f, format: sigmf ? 'sigmf' : 'raw', sidecar: { name: side.name, text }, summary: `${d.channels} ch · ${d.sampleRate} Hz · ${(d.frames / d.sampleRate).toFixed(1)} s` });
      }
    } catch (err) {
      refused.push({ name: f.name, reason: err instanceof RecordingFormatError || err instanceof Error ? err.message : String(err) });
    }
  }
  // Side files whose data file was not picked.
  for (const f of files) {
    if (used.has(f.name) || ok.some((o) => o.data === f) || refused.some((r) => r.name === f.name)) continue;
    if (/\.(sigmf-meta|json)$/i.test(f.name)) refused.push({ name: f.name, reason: `${f.name} is a side file; pick it together with its data file.` });
  }
  return { ok, refused };
}
