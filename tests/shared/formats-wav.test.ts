/**
 * WAV/RF64 header parser. Valid files come from `wavefile` 11 (npm), an independent writer;
 * malformed ones are its output with single fields broken, one per DOMAIN.md §4 reject rule.
 * Field layout per Microsoft WAVEFORMATEX/WAVEFORMATEXTENSIBLE; ds64 per EBU Tech 3306.
 */
import { expect } from 'chai';
import { parseWavHeader } from '../../shared/formats/wav-header.js';
import { recordingDescriptionSchema } from '../../shared/formats/recording-description.js';
import { buildWavHeader } from '../../samples/writers/wav-header-writer.js';
import { chunkAt, expectFormatError, view, wavefileBytes, wavefileDecode } from './formats-test-helpers.js';

const F = 'demo.wav';

describe('parseWavHeader: files written by wavefile (independent writer)', () => {
  const cases = [
    { bd: '8', enc: 'u8', bytes: 1 },
    { bd: '16', enc: 'i16', bytes: 2 },
    { bd: '24', enc: 'i24', bytes: 3 },
    { bd: '32', enc: 'i32', bytes: 4 },
    { bd: '32f', enc: 'f32', bytes: 4 },
    { bd: '64', enc: 'f64', bytes: 8 },
  ] as const;
  for (const c of cases) {
    for (const ch of [1, 2, 6]) {
      it(`${c.bd}-bit, ${ch} channel(s)`, () => {
        const b = wavefileBytes(c.bd, ch, 101, 48000);
        const d = parseWavHeader(b, b.length, F);
        recordingDescriptionSchema.parse(d);
        expect(d).to.include({ format: 'wav', encoding: c.enc, channels: ch, sampleRate: 48000, frames: 101, complex: false, littleEndian: true, layout: 'interleaved' });
        const data = chunkAt(b, 'data');
        expect(d.dataOffset).to.equal(data + 8);
        expect(d.dataBytes).to.equal(101 * ch * c.bytes);
      });
    }
  }

  it('reads a header from the first bytes only and says how many more it needs', () => {
    const b = wavefileBytes('16', 4, 1000);
    const d = parseWavHeader(b.subarray(0, 80), b.length, F);
    expect(d.frames).to.equal(1000);
    const err = expectFormatError(() => parseWavHeader(b.subarray(0, 30), b.length, F), F, undefined, /first 30 bytes/, /Read at least \d+ bytes/);
    expect(err.bytesNeeded).to.be.greaterThan(30);
    // Following bytesNeeded converges in a few rounds (fmt chunk, then the data chunk header).
    let n = err.bytesNeeded as number;
    for (let round = 0; round < 4; round++) {
      try {
        expect(parseWavHeader(b.subarray(0, n), b.length, F).frames).to.equal(1000);
        return;
      } catch (e) {
        n = (e as { bytesNeeded: number }).bytesNeeded;
      }
    }
    expect.fail('bytesNeeded did not converge');
  });

  it('accepts WAVE_FORMAT_EXTENSIBLE with a float SubFormat (Microsoft KSDATAFORMAT_SUBTYPE_IEEE_FLOAT)', () => {
    const b = wavefileBytes('32f', 4, 50);
    const fmt = chunkAt(b, 'fmt ');
    view(b).setUint16(fmt + 8, 0xfffe, true);
    b[fmt + 8 + 24] = 3; // SubFormat first two bytes = format code 3 (float)
    const d = parseWavHeader(b, b.length, F);
    expect(d.encoding).to.equal('f32');
  });
});

describe('parseWavHeader: RF64 (EBU Tech 3306) and our own writer', () => {
  it('reads an RF64 header whose sizes live in ds64', () => {
    const frames = 1000;
    const h = buildWavHeader({ container: 'rf64', channels: 3, sampleRate: 8000, encoding: 'i24', frames });
    const size = h.length + frames * 9 + 1; // odd data → pad byte
    const d = parseWavHeader(h, size, 'big.wav');
    expect(d).to.include({ format: 'rf64', channels: 3, encoding: 'i24', frames, dataOffset: h.length, dataBytes: frames * 9 });
  });

  it('reads sizes beyond 4 GiB from ds64 (header only, as the browser would)', () => {
    const frames = 600_000_000; // 32 channels × 2 bytes → 38.4 GB
    const h = buildWavHeader({ container: 'rf64', channels: 32, sampleRate: 96000, encoding: 'i16', frames });
    const d = parseWavHeader(h, h.length + frames * 64, 'long.wav');
    expect(d.frames).to.equal(frames);
    expect(d.dataBytes).to.equal(frames * 64);
  });

  it('refuses RF64 without a leading ds64 chunk', () => {
    const b = wavefileBytes('16', 2, 10);
    b.set([0x52, 0x46, 0x36, 0x34], 0); // "RF64"
    view(b).setUint32(4, 0xffffffff, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, 12, /no ds64 chunk/);
  });

  it('refuses RF64 whose ds64 size disagrees with the file length', () => {
    const h = buildWavHeader({ container: 'rf64', channels: 2, sampleRate: 8000, encoding: 'i16', frames: 100 });
    expectFormatError(() => parseWavHeader(h, h.length + 200, 'cut.wav'), 'cut.wav', 20, /truncated/);
  });

  it('the generator\'s multichannel WAV is readable by wavefile too', () => {
    const h = buildWavHeader({ container: 'wav', channels: 4, sampleRate: 8000, encoding: 'i16', frames: 3 });
    const bytes = new Uint8Array(h.length + 24);
    bytes.set(h);
    new Int16Array(bytes.buffer, h.length, 12).set([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(Array.from(wavefileDecode(bytes)[3])).to.deep.equal([4, 8, 12]);
    expect(parseWavHeader(bytes, bytes.length, F).frames).to.equal(3);
  });
});

describe('parseWavHeader: reject list (DOMAIN.md §4), each message names file, offset and problem', () => {
  const base = (): Uint8Array => wavefileBytes('16', 4, 20);
  const fmtBody = (b: Uint8Array): number => chunkAt(b, 'fmt ') + 8;

  it('bad magic', () => {
    const b = base();
    b.set([0x4f, 0x67, 0x67, 0x53], 0);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, 0, /not a WAV file/);
  });
  it('big-endian RIFX', () => {
    const b = base();
    b.set([0x52, 0x49, 0x46, 0x58], 0);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, 0, /big-endian/);
  });
  it('form type not WAVE', () => {
    const b = base();
    b.set([0x41, 0x56, 0x49, 0x20], 8);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, 8, /form type is "AVI "/);
  });
  it('fmt chunk missing', () => {
    const b = base();
    b.set([0x4a, 0x55, 0x4e, 0x4b], chunkAt(b, 'fmt ')); // rename to JUNK
    expectFormatError(() => parseWavHeader(b, b.length, F), F, undefined, /data chunk .* comes before any fmt chunk/);
  });
  it('fmt chunk shorter than 16 bytes', () => {
    const b = base();
    const at = chunkAt(b, 'fmt ');
    view(b).setUint32(at + 4, 14, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, at + 4, /shorter than the 16/);
  });
  it('extensible cbSize < 22', () => {
    const b = base();
    const f = fmtBody(b);
    view(b).setUint16(f, 0xfffe, true);
    view(b).setUint16(f + 16, 10, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, f + 16, /cbSize 10/);
  });
  it('compressed codes are named (μ-law, ADPCM, MP3)', () => {
    for (const [tag, name] of [[7, /μ-law/], [2, /ADPCM/], [0x55, /MP3/]] as const) {
      const b = base();
      view(b).setUint16(fmtBody(b), tag, true);
      expectFormatError(() => parseWavHeader(b, b.length, F), F, fmtBody(b), name, /not linear PCM or float/);
    }
  });
  it('unknown SubFormat GUID', () => {
    const b = base();
    const f = fmtBody(b);
    view(b).setUint16(f, 0xfffe, true);
    b[f + 30] = 0x77;
    expectFormatError(() => parseWavHeader(b, b.length, F), F, f + 24, /SubFormat GUID/);
  });
  it('unsupported bit depths', () => {
    const b = base();
    view(b).setUint16(fmtBody(b) + 14, 12, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, fmtBody(b) + 14, /12 bits are not supported/);
    const fl = wavefileBytes('32f', 2, 4);
    view(fl).setUint16(fmtBody(fl) + 14, 16, true);
    expectFormatError(() => parseWavHeader(fl, fl.length, F), F, fmtBody(fl) + 14, /float samples of 16 bits/);
  });
  it('zero channels (the example from the task)', () => {
    const b = base();
    view(b).setUint16(fmtBody(b) + 2, 0, true);
    const e = expectFormatError(() => parseWavHeader(b, b.length, F), F, fmtBody(b) + 2, /0 channels/);
    expect(e.message).to.equal(`demo.wav @ byte ${fmtBody(b) + 2}: fmt chunk says 0 channels; the file is damaged or not a multichannel recording. Re-export it with the channel count set.`);
  });
  it('zero and absurd sample rates', () => {
    const b = base();
    view(b).setUint32(fmtBody(b) + 4, 0, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, fmtBody(b) + 4, /0 Hz/);
    view(b).setUint32(fmtBody(b) + 4, 3_000_000_000, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, fmtBody(b) + 4, /above the 20000000 Hz/);
  });
  it('inconsistent nBlockAlign and nAvgBytesPerSec', () => {
    const b = base();
    view(b).setUint16(fmtBody(b) + 12, 6, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, fmtBody(b) + 12, /nBlockAlign is 6/);
    const c = base();
    view(c).setUint32(fmtBody(c) + 8, 1234, true);
    expectFormatError(() => parseWavHeader(c, c.length, F), F, fmtBody(c) + 8, /nAvgBytesPerSec is 1234/);
  });
  it('valid bits above the container', () => {
    const b = base();
    const f = fmtBody(b);
    view(b).setUint16(f, 0xfffe, true);
    view(b).setUint16(f + 18, 20, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, f + 18, /valid bits per sample \(20\) exceed/);
  });
  it('truncated file (RIFF size beyond the end) and data chunk past the end', () => {
    const b = base();
    expectFormatError(() => parseWavHeader(b.subarray(0, b.length - 10), b.length - 10, F), F, 4, /truncated/);
    const c = base();
    const data = chunkAt(c, 'data');
    view(c).setUint32(data + 4, 10_000, true);
    view(c).setUint32(4, 10_000 + data, true);
    expectFormatError(() => parseWavHeader(c, c.length, F), F, undefined, /truncated/);
  });
  it('data not a whole number of frames', () => {
    const b = base();
    const data = chunkAt(b, 'data');
    view(b).setUint32(data + 4, 20 * 8 - 2, true);
    expectFormatError(() => parseWavHeader(b, b.length, F), F, data + 4, /not a whole number of 8-byte frames/);
  });
  it('multiple data chunks', () => {
    const b = base();
    const extra = new Uint8Array(b.length + 16);
    extra.set(b);
    extra.set([0x64, 0x61, 0x74, 0x61, 8, 0, 0, 0], b.length);
    view(extra).setUint32(4, extra.length - 8, true);
    expectFormatError(() => parseWavHeader(extra, extra.length, F), F, b.length, /second data chunk/);
  });
  it('fmt after data', () => {
    const b = base();
    const fmt = chunkAt(b, 'fmt ');
    const fmtLen = 8 + view(b).getUint32(fmt + 4, true);
    const data = chunkAt(b, 'data');
    const reordered = new Uint8Array(b.length);
    reordered.set(b.subarray(0, 12));
    reordered.set(b.subarray(data), 12);
    reordered.set(b.subarray(fmt, fmt + fmtLen), 12 + (b.length - data));
    // Any chunk between fmt and data (none here) would be dropped; sizes are unchanged.
    expectFormatError(() => parseWavHeader(reordered, reordered.length, F), F, undefined, /before any fmt chunk/);
  });
  it('empty data chunk', () => {
    const h = buildWavHeader({ container: 'wav', channels: 2, sampleRate: 8000, encoding: 'i16', frames: 0 });
    expectFormatError(() => parseWavHeader(h, h.length, F), F, undefined, /data chunk is empty/);
  });
  it('chunk list garbage before data', () => {
    const b = base();
    b.set([0x00, 0x01, 0x02, 0x03], chunkAt(b, 'data'));
    expectFormatError(() => parseWavHeader(b, b.length, F), F, undefined, /not text/);
  });
});
