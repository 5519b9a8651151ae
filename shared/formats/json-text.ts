/** Shared helpers for the JSON side files (SigMF meta, raw side file). */
import { MAX_SIDECAR_CHARS } from './limits.js';
import { RecordingFormatError } from './recording-format-error.js';

/** Parses side-file text, turning JSON.parse's message into a RecordingFormatError with a line and column. */
export function parseJsonText(text: string, fileName: string, what: string): unknown {
  if (typeof text !== 'string') {
    throw new RecordingFormatError(fileName, null, '(file)', `the ${what} is not text`, `Pass the ${what} as UTF-8 text.`);
  }
  if (text.length > MAX_SIDECAR_CHARS) {
    throw new RecordingFormatError(fileName, null, '(file)', `the ${what} is ${text.length} characters, more than the ${MAX_SIDECAR_CHARS} a metadata file may have`, 'Check that you picked the metadata file, not the sample data.');
  }
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  try {
    return JSON.parse(body);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    const pos = /position (\d+)/.exec(msg);
    let where = '';
    if (pos) {
      const p = Number(pos[1]);
      const before = body.slice(0, p);
      const line = before.split('\n').length;
      const col = p - before.lastIndexOf('\n');
      where = ` at line ${line}, column ${col}`;
    }
    throw new RecordingFormatError(fileName, null, '(file)', `the ${what} is not valid JSON${where} (${msg.replace(/\s+/g, ' ').slice(0, 160)})`, 'Fix the JSON syntax (a JSON validator shows the spot) and try again.');
  }
}

export function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** Element positions must be distinct: two elements at one spot make the steering vectors singular. */
export function findDuplicatePosition(positions: ReadonlyArray<readonly [number, number, number]>): [number, number] | null {
  const seen = new Map<string, number>();
  for (let i = 0; i < positions.length; i++) {
    const key = positions[i].join(',');
    const first = seen.get(key);
    if (first !== undefined) return [first, i];
    seen.set(key, i);
  }
  return null;
}
