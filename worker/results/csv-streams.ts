/**
 * weights.csv and sinr.csv streamed from the result files. Rows are generated one block at a
 * time (one window and bin for weights, one window and beam for SINR) by an async generator;
 * Readable.from pulls the next block only when the consumer has drained the last one, so
 * back-pressure holds and the whole CSV is never in memory. The same code serves downloads
 * and the CLI.
 *
 * Comment lines: each file starts with `# ` lines (product, conventions version, caution)
 * before the header line. Most analysis tools skip them (pandas `comment='#'`, R
 * `comment.char`, numpy `comments`), and the caution must travel with the numbers when a CSV
 * is passed on alone. Tools that cannot skip comments get `comments: false`.
 */
import { Readable } from 'node:stream';
import type { ResultHeader } from './result-header.js';
import { ResultReader } from './result-reader.js';
import { resolveFilter, CsvFilterError, type CsvFilter, type ResolvedFilter } from './csv-filter.js';
import { decibels, fixedTrimmed, significant } from './csv-number-format.js';

export const WEIGHTS_CSV_COLUMNS = 'window,t_start_s,t_end_s,freq_hz,azimuth_deg,elevation_deg,channel,weight_re,weight_im';
export const SINR_CSV_COLUMNS = 'window,t_start_s,t_end_s,azimuth_deg,elevation_deg,freq_hz,sinr_db,capon_power_db,conventional_power_db,wng_db,loading';

const time = (s: number) => fixedTrimmed(s, 9);
const freq = (f: number) => fixedTrimmed(f, 6);
const angle = (a: number) => fixedTrimmed(a, 6);

function loadingText(h: ResultHeader): string {
  const l = h.setup.loading;
  switch (l.kind) {
    case 'none':
      return 'none';
    case 'trace':
    case 'noise-floor':
      return `${l.kind} ${l.levelDb} dB`;
    case 'ledoit-wolf':
      return 'ledoit-wolf shrinkage';
    case 'wng-floor':
      return `wng-floor ${l.minWngDb} dB`;
  }
}

/** The `# ` lines both files start with (ASCII only, so every reader shows them intact). */
export function commentLines(h: ResultHeader, what: string, extra: string[]): string {
  const p = h.params;
  const lines = [
    `Nullsmith adaptive beamforming results: ${what}`,
    `Conventions version ${h.conventionsVersion}: azimuth 0 deg = broadside (+y), +90 deg = endfire toward +x; elevation +90 deg = +z; steering v_n = exp(+j*2*pi*f*(p_n.u)/c); beam output y = w^H x with w^H v = 1`,
    `Window j covers STFT frames [j*${p.windowHop}, j*${p.windowHop}+${p.snapshotsPerWindow}) (nfft ${p.nfft}, hop ${p.hop}, ${p.window} window); t_start_s and t_end_s are seconds from the first sample of the recording`,
    `Beamformer ${h.setup.beamformer}, loading ${loadingText(h)}, speed ${h.setup.speedMps} m/s, ${h.setup.channels} elements`,
    ...extra,
    `CAUTION: ${h.caution}`,
  ];
  return lines.map((l) => `# ${l}\n`).join('');
}

async function* weightsRows(reader: ResultReader, f: ResolvedFilter, savedSlots: number[]): AsyncGenerator<string> {
  const h = reader.header;
  const { channels, binFreqsHz, azimuthsDeg, elevationsDeg, savedBeams } = h.setup;
  const nSaved = savedBeams.length;
  const field = reader.field('weights');
  const perBin = nSaved * channels * 2;
  const buf = new Float32Array(field.length);
  for (let j = f.fromWindow; j <= f.toWindow; j++) {
    await reader.readSlice(j, field.offset, field.length, buf);
    const span = reader.span(j);
    const lead = `${j},${time(span.startS)},${time(span.endS)},`;
    for (const b of f.bins) {
      let rows = '';
      const fText = freq(binFreqsHz[b]);
      for (const s of savedSlots) {
        const beam = savedBeams[s];
        const beamText = `${angle(azimuthsDeg[beam])},${angle(elevationsDeg[beam])}`;
        const base = b * perBin + s * channels * 2;
        for (let n = 0; n < channels; n++) {
          rows += `${lead}${fText},${beamText},${n},${significant(buf[base + 2 * n])},${significant(buf[base + 2 * n + 1])}\n`;
        }
      }
      yield rows;
    }
  }
}

async function* sinrRows(reader: ResultReader, f: ResolvedFilter): AsyncGenerator<string> {
  const h = reader.header;
  const { binFreqsHz, azimuthsDeg, elevationsDeg } = h.setup;
  const nBeams = azimuthsDeg.length;
  const record = new Float32Array(h.records.floatsPerWindow);
  const at = (name: Parameters<ResultReader['field']>[0]) => reader.field(name).offset;
  const oBbA = at('broadbandAdaptivePower');
  const oBbC = at('broadbandConventionalPower');
  const oBbS = at('broadbandSinr');
  const oLoad = at('loading');
  const oA = at('adaptivePower');
  const oC = at('conventionalPower');
  const oW = at('wng');
  const oS = at('sinr');
  for (let j = f.fromWindow; j <= f.toWindow; j++) {
    await reader.readWindow(j, record);
    const span = reader.span(j);
    const lead = `${j},${time(span.startS)},${time(span.endS)},`;
    for (const beam of f.beams) {
      const beamText = `${angle(azimuthsDeg[beam])},${angle(elevationsDeg[beam])}`;
      // Broadband row: incoherent sum over the band, freq_hz empty; WNG and loading are per bin.
      let rows = `${lead}${beamText},,${decibels(record[oBbS + beam])},${decibels(record[oBbA + beam])},${decibels(record[oBbC + beam])},,\n`;
      for (const b of f.bins) {
        const i = b * nBeams + beam;
        rows += `${lead}${beamText},${freq(binFreqsHz[b])},${decibels(record[oS + i])},${decibels(record[oA + i])},${decibels(record[oC + i])},${decibels(record[oW + i])},${significant(record[oLoad + b])}\n`;
      }
      yield rows;
    }
  }
}

async function* withHeader(lead: string, rows: AsyncGenerator<string>, reader: ResultReader): AsyncGenerator<string> {
  try {
    yield lead;
    yield* rows;
  } finally {
    await reader.close();
  }
}

/** A stream destroyed before its generator started never runs the generator's finally. */
function closingReader(stream: Readable, reader: ResultReader): Readable {
  stream.once('close', () => void reader.close());
  return stream;
}

/**
 * weights.csv for the saved beams. Resolves (or rejects with a clear CsvFilterError) before
 * any byte is produced. `filter.beams` must name saved beams.
 */
export async function createWeightsCsvStream(dir: string, filter: CsvFilter = {}): Promise<Readable> {
  const reader = await ResultReader.open(dir);
  try {
    const h = reader.header;
    const f = resolveFilter(h, reader.windowsStored, filter);
    const saved = h.setup.savedBeams;
    if (saved.length === 0) throw new CsvFilterError('this job saved no weights (params.savedBeams was empty); re-run it with the beams whose weights you need');
    let slots = saved.map((_, s) => s);
    if (filter.beams) {
      const missing = f.beams.filter((b) => !saved.includes(b));
      if (missing.length) {
        const list = saved.map((b) => `${b} (${h.setup.azimuthsDeg[b]}°)`).join(', ');
        throw new CsvFilterError(`beam${missing.length > 1 ? 's' : ''} ${missing.join(', ')} ha${missing.length > 1 ? 've' : 's'} no saved weights; saved beams are ${list}`);
      }
      slots = slots.filter((s) => f.beams.includes(saved[s]));
    }
    const extra = ['Complex weights w (w^H x is the beam output), one row per window, bin, saved beam and element channel (element order of run.json)'];
    const lead = (f.comments ? commentLines(h, 'adaptive weights of the saved beams', extra) : '') + `${WEIGHTS_CSV_COLUMNS}\n`;
    return closingReader(Readable.from(withHeader(lead, weightsRows(reader, f, slots), reader), { objectMode: false }), reader);
  } catch (e) {
    await reader.close();
    throw e;
  }
}

/** sinr.csv: per window and beam a broadband row (freq_hz empty), then one row per bin. */
export async function createSinrCsvStream(dir: string, filter: CsvFilter = {}): Promise<Readable> {
  const reader = await ResultReader.open(dir);
  try {
    const h = reader.header;
    const f = resolveFilter(h, reader.windowsStored, filter);
    const extra = [
      'Powers in dB re 1 (full scale squared per bin; broadband rows sum the band); capon_power_db is the adaptive beam output power w^H R w',
      h.setup.sinrMethod === 'evaluation-block'
        ? 'sinr_db is the bias-corrected estimate against noise-only frames that did not build the weights; empty where it is not positive (not detected); wng_db = |w^H v|^2 / (w^H w)'
        : 'sinr_db is a heuristic UPPER BOUND (no noise-only interval was given: noise floor from the smallest eigenvalues), not an estimate; wng_db = |w^H v|^2 / (w^H w)',
      'loading = diagonal loading delta added to R (linear, units of R); broadband rows leave freq_hz, wng_db and loading empty',
    ];
    const lead = (f.comments ? commentLines(h, 'SINR, power and white-noise gain per window, beam and bin', extra) : '') + `${SINR_CSV_COLUMNS}\n`;
    return closingReader(Readable.from(withHeader(lead, sinrRows(reader, f), reader), { objectMode: false }), reader);
  } catch (e) {
    await reader.close();
    throw e;
  }
}
