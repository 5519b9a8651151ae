/**
 * Raw binary samples described by Nullsmith's JSON side file. The side file reuses SigMF
 * datatype strings (byte order in the suffix) so one vocabulary covers both formats.
 *
 * Example (`survey.raw.json` next to `survey.raw`):
 *   { "sample_rate": 8000, "num_channels": 16, "datatype": "ri16_le", "header_bytes": 0,
 *     "layout": "interleaved", "element_positions_m": [[0,0,0], [0.5,0,0], ...] }
 */
import * as z from 'zod';
import { MAX_BASEBAND_SAMPLE_RATE_HZ, MAX_CHANNELS, MIN_SAMPLE_RATE_HZ } from './limits.js';
import { findDuplicatePosition, parseJsonText } from './json-text.js';
import type { RecordingDescription } from './recording-description.js';
import { RecordingFormatError } from './recording-format-error.js';
import { ENCODING_BYTES, parseSigmfDatatype } from './sample-encoding.js';

const position = z.tuple([z.number().finite(), z.number().finite(), z.number().finite()], { error: 'each position is [x, y, z] in metres' });

export const rawSidecarSchema = z
  .object({
    /** Samples per second per channel (complex: I/Q pairs per second). */
    sample_rate: z.number({ error: 'sample_rate must be a number in Hz' }).finite().min(MIN_SAMPLE_RATE_HZ, `sample_rate must be at least ${MIN_SAMPLE_RATE_HZ} Hz`).max(MAX_BASEBAND_SAMPLE_RATE_HZ, `sample_rate must be at most ${MAX_BASEBAND_SAMPLE_RATE_HZ} Hz`),
    num_channels: z.number({ error: 'num_channels must be a whole number' }).int('num_channels must be a whole number').min(1, 'num_channels must be at least 1').max(MAX_CHANNELS, `num_channels must be at most ${MAX_CHANNELS}`),
    /** SigMF datatype string, e.g. "ri16_le", "rf32_le", "ci16_le". */
    datatype: z.string({ error: 'datatype must be a SigMF datatype string such as "ri16_le"' }),
    /** Bytes to skip at the start of the data file. */
    header_bytes: z.number({ error: 'header_bytes must be a whole number' }).int('header_bytes must be a whole number').min(0, 'header_bytes cannot be negative').default(0),
    /** interleaved: frame after frame; planar: all of channel 0, then all of channel 1, ... */
    layout: z.enum(['interleaved', 'planar'], { error: 'layout must be "interleaved" or "planar"' }).default('interleaved'),
    /** Centre frequency (Hz) of complex baseband; required for complex datatypes. */
    center_frequency: z.number({ error: 'center_frequency must be a number in Hz' }).finite().optional(),
    /** Element positions in metres in Nullsmith's array frame, one per element. */
    element_positions_m: z.array(position).max(MAX_CHANNELS).optional(),
    /** For each element (in element_positions_m order), the file channel that feeds it (0-based). */
    channel_order: z.array(z.number().int('channel numbers are whole numbers').min(0, 'channel numbers start at 0')).max(MAX_CHANNELS).optional(),
    /** Linear calibration gain per file channel, applied when reading. */
    channel_gains: z.array(z.number().finite().positive('gains must be positive')).max(MAX_CHANNELS).optional(),
    /** ISO 8601 UTC time of the first sample. */
    start_time_utc: z.iso.datetime({ error: 'start_time_utc must be an ISO 8601 UTC time such as 2025-06-01T12:00:00Z' }).optional(),
    /** Multiplier applied after full-scale conversion (e.g. pascals per full scale). */
    scale: z.number({ error: 'scale must be a number' }).finite().positive('scale must be positive').default(1),
    notes: z.string().max(5000).optional(),
  })
  .strict();

export type RawSidecar = z.infer<typeof rawSidecarSchema>;

export function parseRawSidecar(jsonText: string, dataFileSize: number, fileName: string): RecordingDescription {
  const fail = (field: string, problem: string, remedy: string): RecordingFormatError => new RecordingFormatError(fileName, null, field, problem, remedy);
  const doc = parseJsonText(jsonText, fileName, 'raw side file');
  const parsed = rawSidecarSchema.safeParse(doc);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const field = issue.path.length ? issue.path.join('.') : '(top level)';
    if (issue.code === 'unrecognized_keys') {
      throw fail(field, `unknown field(s) ${issue.keys.map((k) => `"${k}"`).join(', ')}`, 'Check the spelling; the side file accepts sample_rate, num_channels, datatype, header_bytes, layout, center_frequency, element_positions_m, channel_order, channel_gains, start_time_utc, scale, notes.');
    }
    const problem = issue.code === 'invalid_type' && issue.input === undefined ? `${field} is missing` : issue.message;
    throw fail(field, problem, 'Correct the side file and upload it again.');
  }
  const s = parsed.data;
  const dt = parseSigmfDatatype(s.datatype, fileName, 'datatype');
  if (dt.complex && s.center_frequency === undefined) {
    throw fail('center_frequency', `datatype ${dt.datatype} is complex baseband but center_frequency is missing`, 'Add the centre frequency in Hz: steering vectors need the physical frequency of every bin.');
  }
  const ch = s.num_channels;
  if (s.channel_gains && s.channel_gains.length !== ch) throw fail('channel_gains', `channel_gains has ${s.channel_gains.length} entries for ${ch} channels`, 'Give one gain per file channel.');
  if (s.channel_order) {
    const seen = new Set<number>();
    s.channel_order.forEach((c, e) => {
      if (c >= ch) throw fail(`channel_order.${e}`, `element ${e} is fed by channel ${c}, but the file has channels 0 to ${ch - 1}`, 'Correct channel_order.');
      if (seen.has(c)) throw fail(`channel_order.${e}`, `channel ${c} feeds two elements`, 'Each element needs its own channel.');
      seen.add(c);
    });
  }
  if (s.element_positions_m) {
    const expected = s.channel_order ? s.channel_order.length : ch;
    if (s.element_positions_m.length !== expected) {
      throw fail('element_positions_m', `element_positions_m has ${s.element_positions_m.length} entries but there are ${expected} ${s.channel_order ? 'entries in channel_order' : 'channels'}`, 'Give one position per element.');
    }
    const dup = findDuplicatePosition(s.element_positions_m);
    if (dup) throw fail(`element_positions_m.${dup[1]}`, `elements ${dup[0]} and ${dup[1]} share the position [${s.element_positions_m[dup[1]].join(', ')}] m`, 'Every element needs its own position.');
  }
  if (!Number.isSafeInteger(dataFileSize) || dataFileSize < 0) throw fail('(data file)', `the data file size ${String(dataFileSize)} is not a whole number of bytes`, 'Pass the size of the data file in bytes.');
  const componentBytes = ENCODING_BYTES[dt.encoding];
  const frameBytes = componentBytes * (dt.complex ? 2 : 1) * ch;
  const dataBytes = dataFileSize - s.header_bytes;
  if (dataBytes <= 0) throw fail('header_bytes', `the data file is ${dataFileSize} bytes, leaving no samples after ${s.header_bytes} header bytes`, 'Check header_bytes and that the right data file was picked.');
  if (dataBytes % frameBytes !== 0) {
    throw fail('(data file)', `the data file holds ${dataBytes} bytes after the header, not a whole number of ${frameBytes}-byte frames (${componentBytes} bytes × ${dt.complex ? '2 (I/Q) × ' : ''}${ch} channels for ${dt.datatype})`, 'Check datatype, num_channels and header_bytes against the data file.');
  }
  const warnings: string[] = [];
  if (!dt.complex && s.center_frequency !== undefined && s.center_frequency !== 0) warnings.push('center_frequency is ignored for real (r*) datatypes.');
  return {
    format: 'raw',
    fileName,
    sampleRate: s.sample_rate,
    channels: ch,
    complex: dt.complex,
    encoding: dt.encoding,
    datatype: dt.datatype,
    validBits: componentBytes * 8,
    littleEndian: dt.littleEndian,
    dataOffset: s.header_bytes,
    dataBytes,
    frames: dataBytes / frameBytes,
    layout: s.layout,
    centerFrequencyHz: dt.complex ? (s.center_frequency as number) : 0,
    ...(s.element_positions_m ? { elementPositionsM: s.element_positions_m } : {}),
    ...(s.channel_order ? { elementChannels: s.channel_order } : {}),
    ...(s.channel_gains ? { channelGains: s.channel_gains } : {}),
    scale: s.scale,
    ...(s.start_time_utc ? { startTimeUtc: s.start_time_utc } : {}),
    warnings,
  };
}
