/**
 * SigMF metadata (SigMF core spec v1.2.x: datatype grammar, captures sorted by
 * core:sample_start; spatial extension v1.1 element_geometry) and Nullsmith's raw side file.
 */
import { expect } from 'chai';
import { parseSigmfMeta, sigmfPointToArrayFrame } from '../../shared/formats/sigmf-meta.js';
import { parseRawSidecar } from '../../shared/formats/raw-sidecar.js';
import { detectFormat } from '../../shared/formats/detect-format.js';
import { parseSigmfDatatype } from '../../shared/formats/sample-encoding.js';
import { recordingDescriptionSchema } from '../../shared/formats/recording-description.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { expectFormatError } from './formats-test-helpers.js';

const M = 'survey.sigmf-meta';
const meta = (global: Record<string, unknown>, captures: unknown[] = [{ 'core:sample_start': 0 }], extra: Record<string, unknown> = {}): string =>
  JSON.stringify({ global: { 'core:version': '1.2.0', 'core:datatype': 'ri16_le', 'core:sample_rate': 8000, ...global }, captures, annotations: [], ...extra });

describe('SigMF datatype grammar (SigMF core spec v1.2 "Dataset Format")', () => {
  it('accepts the types Nullsmith reads, in both byte orders', () => {
    expect(parseSigmfDatatype('ri16_le', M, 'x')).to.deep.equal({ complex: false, encoding: 'i16', littleEndian: true, datatype: 'ri16_le' });
    expect(parseSigmfDatatype('cf32_be', M, 'x')).to.include({ complex: true, encoding: 'f32', littleEndian: false });
    expect(parseSigmfDatatype('ri32_le', M, 'x').encoding).to.equal('i32');
    expect(parseSigmfDatatype('ci8', M, 'x')).to.include({ complex: true, encoding: 'i8' });
    expect(parseSigmfDatatype('ru8', M, 'x').encoding).to.equal('u8');
    expect(parseSigmfDatatype('cf64_le', M, 'x').encoding).to.equal('f64');
  });
  it('refuses multi-byte types without byte order, unsigned 16/32 by name, and non-grammar strings', () => {
    expectFormatError(() => parseSigmfDatatype('ri16', M, 'x'), M, null, /without a byte order/);
    expectFormatError(() => parseSigmfDatatype('cu16_le', M, 'x'), M, null, /valid SigMF but Nullsmith does not read it/);
    expectFormatError(() => parseSigmfDatatype('ri24_le', M, 'x'), M, null, /not a SigMF datatype/);
    expectFormatError(() => parseSigmfDatatype('ri8_le', M, 'x'), M, null, /not a SigMF datatype/);
  });
});

describe('parseSigmfMeta', () => {
  it('describes an interleaved real multichannel recording', () => {
    const d = parseSigmfMeta(meta({ 'core:num_channels': 4 }), 4 * 2 * 1000, M);
    recordingDescriptionSchema.parse(d);
    expect(d).to.include({ format: 'sigmf', channels: 4, frames: 1000, encoding: 'i16', complex: false, centerFrequencyHz: 0, dataOffset: 0 });
  });
  it('complex baseband takes core:frequency from the captures and honours header_bytes', () => {
    const d = parseSigmfMeta(meta({ 'core:datatype': 'cf32_le', 'core:num_channels': 2 }, [{ 'core:sample_start': 0, 'core:frequency': 1.2e9, 'core:header_bytes': 16 }]), 16 + 2 * 2 * 4 * 10, M);
    expect(d).to.include({ complex: true, frames: 10, dataOffset: 16, centerFrequencyHz: 1.2e9 });
  });
  it('maps spatial element_geometry into the array frame (boresight +x → +y, line along y → x)', () => {
    // SigMF spatial v1.1: boresight +x, horizontal ULA along y, azimuth clockwise. A source at SigMF
    // azimuth +θ (clockwise from boresight) is at Nullsmith azimuth +θ (toward +x) [derived, M].
    expect(sigmfPointToArrayFrame([0, 0.3, 0])).to.deep.equal([-0.3, 0, 0]);
    expect(sigmfPointToArrayFrame([1, 0, 0])).to.deep.equal([0, 1, 0]);
    const pts = [[0, 0, 0], [0, -0.5, 0], [0, -1, 0]].map((point) => ({ point }));
    const d = parseSigmfMeta(meta({ 'core:num_channels': 3 }, [{ 'core:sample_start': 0, 'spatial:element_geometry': pts }]), 3 * 2 * 5, M);
    expect(d.elementPositionsM).to.deep.equal([[0, 0, 0], [0.5, 0, 0], [1, 0, 0]]);
  });
  it('reject list: invalid JSON, missing keys, sizes, unsorted captures, retunes, bad sha512, collections', () => {
    expectFormatError(() => parseSigmfMeta('{"global": {', 10, M), M, null, /not valid JSON/);
    expectFormatError(() => parseSigmfMeta(JSON.stringify({ global: { 'core:datatype': 'ri16_le', 'core:sample_rate': 1 }, captures: [] }), 10, M), M, null, /core:version/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:datatype': undefined }), 10, M), M, null, /core:datatype must be a text/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:sample_rate': undefined }), 10, M), M, null, /core:sample_rate is missing/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:sample_rate': 0 }), 10, M), M, null, /outside 1 Hz/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:num_channels': 0 }), 10, M), M, null, /whole number from 1/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:num_channels': 3 }), 3 * 2 * 10 + 2, M), M, null, /not a whole number of 6-byte frames/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:datatype': 'ci16_le' }, [{ 'core:sample_start': 0 }]), 40, M), M, null, /no capture gives core:frequency/);
    expectFormatError(() => parseSigmfMeta(meta({}, [{ 'core:sample_start': 5 }, { 'core:sample_start': 2 }]), 40, M), M, null, /not sorted/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:datatype': 'cf32_le' }, [{ 'core:sample_start': 0, 'core:frequency': 1e6 }, { 'core:sample_start': 1, 'core:frequency': 2e6 }]), 80, M), M, null, /changes from/);
    expectFormatError(() => parseSigmfMeta(meta({ 'core:sha512': 'abc' }), 40, M), M, null, /128 hex digits/);
    expectFormatError(() => parseSigmfMeta(JSON.stringify({ collection: { 'core:version': '1.2.0', 'core:streams': [] } }), 40, M), M, null, /Collection/);
    expectFormatError(() => parseSigmfMeta(meta({}), 0, M), M, null, /holds no samples/);
    const dupGeom = [[0, 0, 0], [0, 0, 0]].map((point) => ({ point }));
    expectFormatError(() => parseSigmfMeta(meta({ 'core:num_channels': 2 }, [{ 'core:sample_start': 0, 'spatial:element_geometry': dupGeom }]), 40, M), M, null, /share the position/);
    const short = [[0, 0, 0]].map((point) => ({ point }));
    expectFormatError(() => parseSigmfMeta(meta({ 'core:num_channels': 2 }, [{ 'core:sample_start': 0, 'spatial:element_geometry': short }]), 40, M), M, null, /1 elements for 2 channels/);
  });
});

describe('parseRawSidecar', () => {
  const R = 'line.raw.json';
  const side = (o: Record<string, unknown>): string => JSON.stringify({ sample_rate: 8000, num_channels: 4, datatype: 'ri16_le', ...o });
  it('round trip of every field', () => {
    const d = parseRawSidecar(
      side({ header_bytes: 64, layout: 'planar', element_positions_m: [[0, 0, 0], [1, 0, 0]], channel_order: [3, 1], channel_gains: [1, 2, 1, 0.5], start_time_utc: '2025-06-01T06:00:00Z', scale: 2.5 }),
      64 + 4 * 2 * 100,
      R,
    );
    recordingDescriptionSchema.parse(d);
    expect(d).to.deep.include({ format: 'raw', frames: 100, layout: 'planar', dataOffset: 64, elementChannels: [3, 1], channelGains: [1, 2, 1, 0.5], scale: 2.5, startTimeUtc: '2025-06-01T06:00:00Z' });
    const c = parseRawSidecar(side({ datatype: 'ci16_be', center_frequency: 433e6 }), 4 * 4 * 3, R);
    expect(c).to.include({ complex: true, littleEndian: false, centerFrequencyHz: 433e6, frames: 3 });
  });
  it('reject list: size not a frame multiple, unknown keys, missing fields, geometry count, duplicates, complex without centre', () => {
    expectFormatError(() => parseRawSidecar(side({}), 4 * 2 * 10 + 1, R), R, null, /not a whole number of 8-byte frames/);
    expectFormatError(() => parseRawSidecar(side({ smaple_rate: 1 }), 80, R), R, null, /unknown field\(s\) "smaple_rate"/);
    expectFormatError(() => parseRawSidecar(JSON.stringify({ num_channels: 2, datatype: 'ri16_le' }), 80, R), R, null, /sample_rate is missing/);
    expectFormatError(() => parseRawSidecar(side({ element_positions_m: [[0, 0, 0]] }), 80, R), R, null, /1 entries but there are 4 channels/);
    expectFormatError(() => parseRawSidecar(side({ element_positions_m: [[0, 0, 0], [1, 0, 0], [1, 0, 0], [2, 0, 0]] }), 80, R), R, null, /share the position/);
    expectFormatError(() => parseRawSidecar(side({ datatype: 'cf32_le' }), 320, R), R, null, /center_frequency is missing/);
    expectFormatError(() => parseRawSidecar(side({ channel_order: [0, 0] }), 80, R), R, null, /feeds two elements/);
    expectFormatError(() => parseRawSidecar(side({ channel_order: [7] }), 80, R), R, null, /channels 0 to 3/);
    expectFormatError(() => parseRawSidecar(side({ header_bytes: 100 }), 80, R), R, null, /no samples after 100 header bytes/);
    expectFormatError(() => parseRawSidecar(side({ num_channels: 5000 }), 80, R), R, null, /at most 1024/);
  });
});

describe('detectFormat', () => {
  const bytes = (s: string): Uint8Array => new TextEncoder().encode(s);
  it('goes by magic first, then by name and content', () => {
    expect(detectFormat('x.bin', bytes('RIFF....WAVE'))).to.equal('wav');
    expect(detectFormat('x.wav', bytes('BW64....WAVE'))).to.equal('rf64');
    expect(detectFormat('a.sigmf-meta', bytes('{"global":{}}'))).to.equal('sigmf-meta');
    expect(detectFormat('a.sigmf-data', new Uint8Array(8))).to.equal('sigmf-data');
    expect(detectFormat('a.json', bytes('{ "sample_rate": 8000, "datatype": "ri16_le" }'))).to.equal('raw-sidecar');
    expect(detectFormat('meta.json', bytes('{ "global": { "core:datatype": "ri16_le" } }'))).to.equal('sigmf-meta');
    expect(detectFormat('a.raw', new Uint8Array(8))).to.equal('raw-data');
  });
  it('names formats it cannot read', () => {
    expectFormatError(() => detectFormat('a.flac', bytes('fLaC\0\0\0\"')), 'a.flac', 0, /FLAC audio/);
    expectFormatError(() => detectFormat('a.wav', bytes('junkjunk')), 'a.wav', 0, /named like a WAV/);
    expectFormatError(() => detectFormat('a.xyz', bytes('hello')), 'a.xyz', 0, /not recognised/);
    expect(() => detectFormat('c.sigmf-collection', bytes('{}'))).to.throw(RecordingFormatError, /Collection/);
  });
});
