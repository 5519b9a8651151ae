/**
 * Property-based fuzzing (fast-check) of every header parser: thousands of random and mutated
 * inputs must yield either a description that satisfies the schema or a RecordingFormatError,
 * never another exception, a hang or a huge allocation. The seed is printed; replay a failure
 * with FUZZ_SEED=<seed> npx mocha tests/shared/fuzz-formats.test.ts.
 */
import { expect } from 'chai';
import fc from 'fast-check';
import { detectFormat } from '../../shared/formats/detect-format.js';
import { parseRawSidecar } from '../../shared/formats/raw-sidecar.js';
import { recordingDescriptionSchema } from '../../shared/formats/recording-description.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { parseSigmfMeta } from '../../shared/formats/sigmf-meta.js';
import { parseWavHeader } from '../../shared/formats/wav-header.js';
import { buildWavHeader } from '../../samples/writers/wav-header-writer.js';
import { wavefileBytes } from './formats-test-helpers.js';

const seed = process.env.FUZZ_SEED ? Number(process.env.FUZZ_SEED) : Date.now() % 2147483647;
const RUNS = Number(process.env.FUZZ_RUNS ?? 2000);

/** Runs fn; passes if it returns a valid description or throws RecordingFormatError. */
function survives(fn: () => unknown): boolean {
  const heapBefore = process.memoryUsage().heapUsed;
  try {
    const d = fn();
    if (d && typeof d === 'object' && 'format' in d) recordingDescriptionSchema.parse(d);
  } catch (e) {
    if (!(e instanceof RecordingFormatError)) throw e;
    expect(e.message.length).to.be.below(2000);
  }
  // A header parser has no reason to hold more than a few MB, whatever the header claims.
  expect(process.memoryUsage().heapUsed - heapBefore).to.be.below(64 * 1024 * 1024);
  return true;
}

const mutate = (base: Uint8Array) =>
  fc
    .record({
      edits: fc.array(fc.tuple(fc.nat(base.length - 1), fc.integer({ min: 0, max: 255 })), { maxLength: 8 }),
      u32: fc.option(fc.tuple(fc.nat(Math.floor((base.length - 4) / 2)), fc.constantFrom(0, 1, 0xffffffff, 0x7fffffff, 0xfffffffe, 22, 40)), { nil: undefined }),
      cut: fc.nat(base.length),
      sizeDelta: fc.integer({ min: -64, max: 1 << 20 }),
    })
    .map(({ edits, u32, cut, sizeDelta }) => {
      const b = base.slice();
      for (const [i, v] of edits) b[i] = v;
      if (u32) new DataView(b.buffer).setUint32(u32[0] * 2, u32[1], true);
      const given = b.subarray(0, Math.max(cut, 1));
      return { given, fileSize: Math.max(0, base.length + sizeDelta) };
    });

describe(`fuzzing the header parsers (fast-check seed ${seed}, ${RUNS} runs each)`, function () {
  this.timeout(60000);
  before(() => console.log(`    fuzz seed: ${seed} (replay with FUZZ_SEED=${seed})`));

  it('parseWavHeader: random bytes', () => {
    fc.assert(fc.property(fc.uint8Array({ maxLength: 600 }), fc.nat(1 << 30), (b, size) => survives(() => parseWavHeader(b, size, 'f.wav'))), { seed, numRuns: RUNS });
  });

  it('parseWavHeader: mutated valid WAV, extensible and RF64 headers', () => {
    const bases = [wavefileBytes('16', 4, 16), wavefileBytes('32f', 2, 8), wavefileBytes('8', 1, 9), buildWavHeader({ container: 'rf64', channels: 3, sampleRate: 8000, encoding: 'i24', frames: 1_000_000 })];
    for (const base of bases) {
      fc.assert(fc.property(mutate(base), ({ given, fileSize }) => survives(() => parseWavHeader(given, fileSize, 'm.wav'))), { seed, numRuns: RUNS / 2 });
    }
  });

  const validMeta = {
    global: { 'core:version': '1.2.0', 'core:datatype': 'ci16_le', 'core:sample_rate': 48000, 'core:num_channels': 4, 'spatial:num_elements': 4 },
    captures: [{ 'core:sample_start': 0, 'core:frequency': 1e6, 'spatial:element_geometry': [0, 1, 2, 3].map((i) => ({ point: [0, i * 0.1, 0] })) }],
    annotations: [],
  };
  const paths: Array<[string, string | number]> = [
    ['global', 'core:datatype'], ['global', 'core:sample_rate'], ['global', 'core:num_channels'], ['global', 'core:version'], ['global', 'core:sha512'], ['global', 'core:trailing_bytes'],
    ['captures', 0], ['annotations', 0],
  ];

  it('parseSigmfMeta: mutated fields with arbitrary JSON values, random text, sizes', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constantFrom(...paths), fc.jsonValue({ maxDepth: 3 })), { maxLength: 4 }), fc.nat(1 << 24), (edits, size) => {
        const m = structuredClone(validMeta) as unknown as Record<string, Record<string | number, unknown>>;
        for (const [[k, f], v] of edits) m[k][f] = v;
        return survives(() => parseSigmfMeta(JSON.stringify(m), size, 'f.sigmf-meta'));
      }),
      { seed, numRuns: RUNS },
    );
    fc.assert(fc.property(fc.string({ maxLength: 300 }), fc.nat(), (t, size) => survives(() => parseSigmfMeta(t, size, 'f.sigmf-meta'))), { seed, numRuns: RUNS / 2 });
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4 }), (v) => survives(() => parseSigmfMeta(JSON.stringify(v) ?? 'null', 1024, 'f.sigmf-meta'))), { seed, numRuns: RUNS / 2 });
  });

  it('parseRawSidecar: mutated fields with arbitrary JSON values', () => {
    const valid: Record<string, unknown> = { sample_rate: 8000, num_channels: 2, datatype: 'ri16_le', header_bytes: 0, layout: 'planar', element_positions_m: [[0, 0, 0], [1, 0, 0]], channel_gains: [1, 1] };
    const keys = [...Object.keys(valid), 'center_frequency', 'channel_order', 'scale', 'start_time_utc', 'bogus'];
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constantFrom(...keys), fc.jsonValue({ maxDepth: 3 })), { maxLength: 4 }), fc.nat(1 << 24), (edits, size) => {
        const s = { ...valid };
        for (const [k, v] of edits) s[k] = v;
        return survives(() => parseRawSidecar(JSON.stringify(s), size, 'f.raw.json'));
      }),
      { seed, numRuns: RUNS },
    );
  });

  it('detectFormat: random names and bytes', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 40 }), fc.constantFrom('', '.wav', '.json', '.sigmf-meta', '.raw', '.flac', '.sigmf'), fc.uint8Array({ maxLength: 64 }), (name, ext, b) => {
        try {
          detectFormat(name + ext, b);
        } catch (e) {
          if (!(e instanceof RecordingFormatError)) throw e;
        }
        return true;
      }),
      { seed, numRuns: RUNS },
    );
  });
});
