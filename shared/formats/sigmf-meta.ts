/**
 * SigMF metadata parser (SigMF core specification v1.2.x, `.sigmf-meta` JSON plus a
 * `.sigmf-data` file of interleaved samples). Reads one multichannel Recording; a Collection
 * (one Recording per channel) is refused with directions to interleave it.
 *
 * Element geometry: the `spatial` extension v1.1 places the aperture boresight on +x with a
 * horizontal line array along y and azimuth increasing clockwise. Nullsmith's frame
 * (CONVENTIONS.md) has broadside on +y, the line array along x and azimuth positive toward +x
 * (also clockwise seen from above). Both keep z up, so the SigMF point (xs, ys, zs) is
 * (−ys, xs, zs) here: a +90° rotation about z (derived from the spec text, DOMAIN.md §1
 * marks the exact mapping [M]; tests/shared/formats-sigmf.test.ts pins it).
 */
import { MAX_BASEBAND_SAMPLE_RATE_HZ, MAX_CHANNELS, MIN_SAMPLE_RATE_HZ } from './limits.js';
import { findDuplicatePosition, isPlainObject, parseJsonText } from './json-text.js';
import type { RecordingDescription } from './recording-description.js';
import { RecordingFormatError } from './recording-format-error.js';
import { describeJson, ENCODING_BYTES, parseSigmfDatatype } from './sample-encoding.js';

/** Converts a SigMF `spatial` point to Nullsmith's array frame (see the file comment). */
export function sigmfPointToArrayFrame(p: readonly [number, number, number]): [number, number, number] {
  return [p[1] === 0 ? 0 : -p[1], p[0], p[2]];
}

export function parseSigmfMeta(metaText: string, dataFileSize: number, fileName: string): RecordingDescription {
  const fail = (field: string, problem: string, remedy: string): RecordingFormatError => new RecordingFormatError(fileName, null, field, problem, remedy);
  const warnings: string[] = [];
  const doc = parseJsonText(metaText, fileName, 'SigMF metadata');
  if (!isPlainObject(doc)) throw fail('(top level)', `the metadata is ${describeJson(doc)}, not a JSON object`, 'A .sigmf-meta file is an object with "global", "captures" and "annotations".');
  if ('collection' in doc) {
    throw fail('collection', 'this is a SigMF Collection file (one Recording per channel), not a Recording', 'Nullsmith reads one multichannel Recording: interleave the channels into one .sigmf-data file with core:num_channels set, then upload its .sigmf-meta.');
  }
  const global = doc.global;
  if (!isPlainObject(global)) throw fail('global', `"global" is ${describeJson(global)}, not an object`, 'Add the "global" object with core:datatype, core:version and core:sample_rate.');
  if (typeof global['core:version'] !== 'string') throw fail('global.core:version', `core:version is ${describeJson(global['core:version'])}`, 'Add "core:version" (e.g. "1.2.0"); every SigMF Recording must state it.');
  if (global['core:metadata_only'] === true) throw fail('global.core:metadata_only', 'the Recording is marked metadata-only and has no samples', 'Upload a Recording that comes with its .sigmf-data file.');
  const dt = parseSigmfDatatype(global['core:datatype'], fileName, 'global.core:datatype');

  const rate = global['core:sample_rate'];
  if (rate === undefined) throw fail('global.core:sample_rate', 'core:sample_rate is missing', 'Add the sample rate in Hz; beamforming needs it to place the frequency bins.');
  if (typeof rate !== 'number' || !Number.isFinite(rate)) throw fail('global.core:sample_rate', `core:sample_rate is ${describeJson(rate)}, not a number`, 'Set it to the sample rate in Hz.');
  if (rate < MIN_SAMPLE_RATE_HZ || rate > MAX_BASEBAND_SAMPLE_RATE_HZ) {
    throw fail('global.core:sample_rate', `core:sample_rate ${rate} Hz is outside ${MIN_SAMPLE_RATE_HZ} Hz to ${MAX_BASEBAND_SAMPLE_RATE_HZ} Hz`, 'Check the value: it must be the sample rate in Hz.');
  }
  const chRaw = global['core:num_channels'] ?? 1;
  if (typeof chRaw !== 'number' || !Number.isInteger(chRaw) || chRaw < 1) throw fail('global.core:num_channels', `core:num_channels is ${describeJson(chRaw)}; it must be a whole number from 1`, 'Set it to the number of interleaved channels in the data file.');
  if (chRaw > MAX_CHANNELS) throw fail('global.core:num_channels', `core:num_channels is ${chRaw}, more than the ${MAX_CHANNELS} Nullsmith accepts`, 'Split the Recording into groups of at most 1024 channels.');
  const channels = chRaw;

  const captures = doc.captures;
  if (!Array.isArray(captures)) throw fail('captures', `"captures" is ${describeJson(captures)}, not a list`, 'Add "captures": [{"core:sample_start": 0, ...}].');
  if (doc.annotations !== undefined && !Array.isArray(doc.annotations)) throw fail('annotations', `"annotations" is ${describeJson(doc.annotations)}, not a list`, 'Make "annotations" a list (it may be empty).');
  if (doc.annotations === undefined) warnings.push('The metadata has no "annotations" list (required by SigMF); none assumed.');
  let previousStart = -1;
  let headerBytes = 0;
  let centerFrequency = null as number | null;
  let positionsSigmf: Array<[number, number, number]> | null = null;
  let startTime: string | undefined;
  captures.forEach((c, i) => {
    const where = `captures[${i}]`;
    if (!isPlainObject(c)) throw fail(where, `${where} is ${describeJson(c)}, not an object`, 'Each capture is an object with at least core:sample_start.');
    const start = c['core:sample_start'];
    if (typeof start !== 'number' || !Number.isSafeInteger(start) || start < 0) throw fail(`${where}.core:sample_start`, `core:sample_start is ${describeJson(start)}; it must be a whole number from 0`, 'Set each capture\'s first sample index.');
    if (start <= previousStart) throw fail(`${where}.core:sample_start`, `captures are not sorted: sample_start ${start} follows ${previousStart}`, 'Sort the captures by core:sample_start (SigMF requires it) and remove duplicates.');
    previousStart = start;
    const hb = c['core:header_bytes'];
    if (hb !== undefined) {
      if (typeof hb !== 'number' || !Number.isSafeInteger(hb) || hb < 0) throw fail(`${where}.core:header_bytes`, `core:header_bytes is ${describeJson(hb)}`, 'Set it to the number of non-sample bytes before this capture\'s samples.');
      if (i === 0) headerBytes = hb;
      else if (hb !== 0) throw fail(`${where}.core:header_bytes`, `capture ${i} has ${hb} header bytes inside the data`, 'Nullsmith reads one continuous block of samples; strip the in-between headers and set core:header_bytes only on the first capture.');
    }
    const f = c['core:frequency'];
    if (f !== undefined) {
      if (typeof f !== 'number' || !Number.isFinite(f)) throw fail(`${where}.core:frequency`, `core:frequency is ${describeJson(f)}`, 'Set it to the centre frequency in Hz.');
      if (centerFrequency === null) centerFrequency = f;
      else if (f !== centerFrequency) {
        throw fail(`${where}.core:frequency`, `the centre frequency changes from ${centerFrequency} Hz to ${f} Hz at sample ${start}`, 'Steering vectors depend on the physical frequency; split the Recording at the retune and upload the parts separately.');
      }
    }
    if (i === 0 && typeof c['core:datetime'] === 'string') startTime = c['core:datetime'];
    const geom = c['spatial:element_geometry'];
    if (geom !== undefined && positionsSigmf === null) positionsSigmf = readGeometry(geom, `${where}.spatial:element_geometry`, fail, warnings);
    const phase = c['spatial:phase_offset'];
    if (typeof phase === 'number' && phase !== 0) warnings.push(`${where} has spatial:phase_offset ${phase}°; for an interleaved Recording it is not applied (calibrate per element in the array description).`);
  });
  if (captures.length === 0) warnings.push('The metadata has no captures; samples are taken from the start of the data file.');

  const complex = dt.complex;
  if (complex && centerFrequency === null) {
    throw fail('captures[0].core:frequency', 'the samples are complex baseband but no capture gives core:frequency', 'Add the centre frequency (Hz) to the first capture: steering vectors need the physical frequency of every bin.');
  }

  const trailing = global['core:trailing_bytes'];
  let trailingBytes = 0;
  if (trailing !== undefined) {
    if (typeof trailing !== 'number' || !Number.isSafeInteger(trailing) || trailing < 0) throw fail('global.core:trailing_bytes', `core:trailing_bytes is ${describeJson(trailing)}`, 'Set it to the number of non-sample bytes at the end of the data file.');
    trailingBytes = trailing;
  }
  if (!Number.isSafeInteger(dataFileSize) || dataFileSize < 0) throw fail('(data file)', `the data file size ${String(dataFileSize)} is not a whole number of bytes`, 'Pass the size of the .sigmf-data file in bytes.');
  const dataBytes = dataFileSize - headerBytes - trailingBytes;
  const componentBytes = ENCODING_BYTES[dt.encoding];
  const frameBytes = componentBytes * (complex ? 2 : 1) * channels;
  if (dataBytes <= 0) throw fail('(data file)', `the data file is ${dataFileSize} bytes and holds no samples after ${headerBytes} header and ${trailingBytes} trailing bytes`, 'Upload the matching .sigmf-data file (it is empty or the wrong one).');
  if (dataBytes % frameBytes !== 0) {
    throw fail('(data file)', `the data file holds ${dataBytes} sample bytes, not a whole number of ${frameBytes}-byte frames (${componentBytes} bytes × ${complex ? '2 (I/Q) × ' : ''}${channels} channels for ${dt.datatype})`, 'Check core:datatype and core:num_channels against the data file, or pick the matching data file.');
  }
  const frames = dataBytes / frameBytes;
  if (previousStart >= frames) throw fail(`captures[${captures.length - 1}].core:sample_start`, `a capture starts at sample ${previousStart}, past the ${frames} samples in the data file`, 'The data file is shorter than the metadata says; upload the complete .sigmf-data.');

  let elementPositionsM: Array<[number, number, number]> | undefined;
  const geometry = positionsSigmf as Array<[number, number, number]> | null;
  if (geometry) {
    const numElements = global['spatial:num_elements'];
    const channelIndex = typeof global['spatial:channel_index'] === 'number' ? (global['spatial:channel_index'] as number) : 0;
    let own = geometry;
    if (geometry.length !== channels && geometry.length === numElements && Number.isInteger(channelIndex) && channelIndex >= 0 && channelIndex + channels <= geometry.length) {
      own = geometry.slice(channelIndex, channelIndex + channels);
    }
    if (own.length !== channels) {
      throw fail('captures.spatial:element_geometry', `element geometry lists ${geometry.length} elements for ${channels} channels`, 'Give one point per channel (or spatial:num_elements points with spatial:channel_index), or remove the geometry and describe the array in Nullsmith.');
    }
    elementPositionsM = own.map(sigmfPointToArrayFrame);
    const dup = findDuplicatePosition(elementPositionsM);
    if (dup) throw fail('captures.spatial:element_geometry', `elements ${dup[0]} and ${dup[1]} share the position [${own[dup[1]].join(', ')}] m`, 'Every element needs its own position; correct the geometry.');
  }
  const sha = global['core:sha512'];
  let sha512: string | undefined;
  if (sha !== undefined) {
    if (typeof sha !== 'string' || !/^[0-9a-fA-F]{128}$/.test(sha)) throw fail('global.core:sha512', `core:sha512 is ${describeJson(sha)}, not 128 hex digits`, 'Correct the checksum or remove it.');
    sha512 = sha.toLowerCase();
  }
  return {
    format: 'sigmf',
    fileName,
    sampleRate: rate,
    channels,
    complex,
    encoding: dt.encoding,
    datatype: dt.datatype,
    validBits: componentBytes * 8,
    littleEndian: dt.littleEndian,
    dataOffset: headerBytes,
    dataBytes,
    frames,
    layout: 'interleaved',
    centerFrequencyHz: complex && centerFrequency !== null ? centerFrequency : 0,
    ...(elementPositionsM ? { elementPositionsM } : {}),
    scale: 1,
    ...(startTime ? { startTimeUtc: startTime } : {}),
    ...(sha512 ? { sha512 } : {}),
    warnings,
  };
}

function readGeometry(
  geom: unknown,
  where: string,
  fail: (field: string, problem: string, remedy: string) => RecordingFormatError,
  warnings: string[],
): Array<[number, number, number]> | null {
  if (!Array.isArray(geom)) throw fail(where, `element geometry is ${describeJson(geom)}, not a list`, 'Give a list of {"point": [x, y, z]} objects in metres.');
  if (geom.length > MAX_CHANNELS) throw fail(where, `element geometry lists ${geom.length} points, more than ${MAX_CHANNELS}`, 'Give one point per element.');
  const out: Array<[number, number, number]> = [];
  for (let i = 0; i < geom.length; i++) {
    const g = geom[i];
    if (isPlainObject(g) && g.unknown === true) {
      warnings.push(`${where}[${i}] is marked unknown; the file's geometry is ignored (describe the array in Nullsmith).`);
      return null;
    }
    const p = isPlainObject(g) ? g.point : undefined;
    if (!Array.isArray(p) || p.length !== 3 || !p.every((x) => typeof x === 'number' && Number.isFinite(x))) {
      throw fail(`${where}[${i}]`, `element ${i} has no valid "point" [x, y, z] (got ${describeJson(p)})`, 'Give each element as {"point": [x, y, z]} in metres, or {"unknown": true}.');
    }
    out.push([p[0], p[1], p[2]]);
  }
  return out;
}
