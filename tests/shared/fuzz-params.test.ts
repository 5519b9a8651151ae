/**
 * Property-based fuzzing (fast-check) of the beamform job parameters (shared/params): thousands
 * of random values and mutated valid parameter sets go through parseBeamformParams, the checks
 * against a recording and the derived layout (bins, beam fan, windows, training plan, estimates).
 * Every input must end as either valid parameters whose derived layout is sane, or a list of
 * problems that each name a field and say what is wrong. Never another exception, a hang (each
 * input is given a generous time bound, a hang detector, not a speed figure) or a large
 * allocation. A last part sends mutated submissions to a real server: never a 500.
 *
 * The seed is printed; replay a failure with FUZZ_SEED=<seed> (FUZZ_RUNS=<n> for more runs):
 *   FUZZ_SEED=123 npx mocha --no-config --node-option import=tsx --extension ts --timeout 180000 tests/shared/fuzz-params.test.ts
 *
 * The header parsers are fuzzed in fuzz-formats.test.ts (WAV/RF64, SigMF, raw side file,
 * detectFormat); the last block here covers the two entry points that file does not reach
 * directly (parseSigmfDatatype with arbitrary strings, parseRawSidecar with arbitrary text).
 */
import { expect } from 'chai';
import fc from 'fast-check';
import { countWindows, estimateOutputBytes, estimateRunSeconds } from '../../shared/advisor/job-estimates.js';
import { lineArray, type ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import { parseRawSidecar } from '../../shared/formats/raw-sidecar.js';
import { parseSigmfDatatype } from '../../shared/formats/sample-encoding.js';
import { formatParamsProblem, MAX_BEAMS, parseBeamformParams, type BeamformParams, type ParamsProblem } from '../../shared/params/beamform-params.js';
import { expandBeamFan, savedBeamIndices, selectBins, windowTiming } from '../../shared/params/job-layout.js';
import { trainingPlan } from '../../shared/params/training-plan.js';
import { validateParamsAgainstRecording, type RecordingInfo } from '../../shared/params/validate-against-recording.js';

const seed = process.env.FUZZ_SEED ? Number(process.env.FUZZ_SEED) : Date.now() % 2147483647;
const RUNS = Number(process.env.FUZZ_RUNS ?? 2000);
/** A hang detector per input, far above the microseconds a parse takes. */
const HANG_MS = 2000;
/** Whatever the input, the problem list and its text stay small enough to show and to send. */
const MAX_PROBLEMS_TEXT = 64 * 1024;

/** Valid parameter sets of every shape the schema knows (DOMAIN.md job examples, our own values). */
const BASES: Record<string, unknown>[] = [
  {
    schemaVersion: 1, nfft: 256, hop: 128, band: { fLoHz: 600, fHiHz: 1400 }, snapshotsPerWindow: 32, windowHop: 2,
    loading: { kind: 'noise-floor', levelDb: 0 }, beamformer: { kind: 'mpdr' }, beams: { azimuthFromDeg: -90, azimuthToDeg: 90, azimuthStepDeg: 2 }, savedBeams: [{ azimuthDeg: 20 }, { azimuthDeg: -40 }],
  },
  {
    schemaVersion: 1, nfft: 512, hop: 256, window: 'blackman', bins: [20, 21, 22, 40], snapshotsPerWindow: 64, windowHop: 8, estimator: { kind: 'exponential', alpha: 0.9 },
    loading: { kind: 'trace', levelDb: -20 }, beamformer: { kind: 'mvdr', training: { source: 'range', startS: 0, endS: 2 } },
    beams: { azimuthFromDeg: -60, azimuthToDeg: 60, azimuthStepDeg: 5, elevationsDeg: [0, 10] }, savedBeams: [{ azimuthDeg: 0, elevationDeg: 10 }], timeRange: { startS: 2, endS: 10 },
  },
  {
    schemaVersion: 1, nfft: 128, hop: 64, band: { fLoHz: 100, fHiHz: 3000 }, snapshotsPerWindow: 16, windowHop: 1, loading: { kind: 'none' }, beamformer: { kind: 'conventional' },
    beams: { azimuthFromDeg: 0, azimuthToDeg: 180, azimuthStepDeg: 1 }, speedOfSoundMps: 1481,
  },
  {
    schemaVersion: 1, nfft: 1024, hop: 1024, band: { fLoHz: 500, fHiHz: 900 }, snapshotsPerWindow: 40, windowHop: 40, loading: { kind: 'wng-floor', minWngDb: 3 },
    beamformer: { kind: 'mvdr', training: { source: 'recording', recordingRef: 'quiet-ledge', range: { startS: 0, endS: 5 } } }, beams: { azimuthFromDeg: -180, azimuthToDeg: 180, azimuthStepDeg: 0.5 },
  },
  {
    schemaVersion: 1, nfft: 256, hop: 64, band: { fLoHz: 700, fHiHz: 1100 }, snapshotsPerWindow: 24, windowHop: 4, loading: { kind: 'ledoit-wolf' },
    beamformer: { kind: 'mpdr', noiseRange: { startS: 0.5, endS: 1.5 } }, beams: { azimuthFromDeg: -30, azimuthToDeg: 30, azimuthStepDeg: 3 },
  },
];

const ARRAY: ArrayGeometry = lineArray({ name: 'fuzz line', count: 8, spacingM: 0.5, speedOfSoundMps: 1500 });
/** Recordings of every kind a job may meet: ordinary, complex baseband, too short, enormous, already routed. */
const RECORDINGS: RecordingInfo[] = [
  { sampleRate: 8000, totalFrames: 8000 * 12, complex: false, centerFrequencyHz: 0, channels: 8 },
  { sampleRate: 48000, totalFrames: 10, complex: false, centerFrequencyHz: 0, channels: 8 },
  { sampleRate: 2_000_000, totalFrames: 1e12, complex: true, centerFrequencyHz: 1e6, channels: 8 },
  { sampleRate: 8000, totalFrames: 8000 * 3600 * 24, complex: false, centerFrequencyHz: 0, channels: null },
  { sampleRate: 8000, totalFrames: 8000 * 60, complex: false, centerFrequencyHz: 0, channels: 4 },
];
const TRAINING: RecordingInfo = { sampleRate: 8000, totalFrames: 8000 * 20, complex: false, centerFrequencyHz: 0, channels: 8 };

/** Values that break careless code: edges of the number line, wrong types, huge and empty things. */
const nasty = fc.oneof(
  fc.constantFrom(NaN, Infinity, -Infinity, -0, 0, 1, -1, 0.5, 1e-300, 5e-324, 1e308, -1e308, 2 ** 31, 2 ** 32 + 1, 2 ** 53 + 2, Number.MAX_SAFE_INTEGER, 63, 64, 65536, 65537, 131072, 100000, 100001, 360, 361, -181, 4096, 4097),
  fc.constantFrom('', '1', '64', 'NaN', 'Infinity', 'none', 'mvdr', 'range', '__proto__', 'constructor', 'x'.repeat(100_000)),
  fc.constantFrom(null, undefined, true, false, [], {}, [[]], { kind: 'none' }, { source: 'range' }),
  fc.double(),
  fc.integer(),
  fc.jsonValue({ maxDepth: 2 }),
  fc.anything({ maxDepth: 2 }),
);

type Path = (string | number)[];

/** Every path in a JSON-like tree (objects and arrays), the root excluded. */
function allPaths(v: unknown, prefix: Path = []): Path[] {
  if (v === null || typeof v !== 'object') return [];
  const entries: [string | number, unknown][] = Array.isArray(v) ? v.map((x, i) => [i, x]) : Object.entries(v);
  return entries.flatMap(([k, x]) => [[...prefix, k], ...allPaths(x, [...prefix, k])]);
}

function setPath(root: unknown, path: Path, value: unknown, mode: 'set' | 'delete' | 'add-key'): void {
  let o = root as Record<string | number, unknown>;
  for (const k of path.slice(0, -1)) o = o[k] as Record<string | number, unknown>;
  if (o === null || typeof o !== 'object') return;
  const last = path[path.length - 1];
  if (mode === 'delete') delete o[last];
  else if (mode === 'add-key') (o as Record<string, unknown>)[`unexpected_${String(last)}`] = value;
  else o[last] = value;
}

/** A private copy of a generated value, so edits never share (or loop through) one object. */
function own(value: unknown): unknown {
  if (value === null || typeof value !== 'object') return value;
  try {
    return structuredClone(value);
  } catch {
    return String(value);
  }
}

/** A valid base with a few edits at random places, at any depth. */
const mutatedParams = fc
  .record({
    base: fc.nat(BASES.length - 1),
    edits: fc.array(fc.tuple(fc.nat(), nasty, fc.constantFrom('set', 'set', 'set', 'delete', 'add-key') as fc.Arbitrary<'set' | 'delete' | 'add-key'>), { minLength: 1, maxLength: 4 }),
  })
  .map(({ base, edits }) => {
    const p = structuredClone(BASES[base]);
    for (const [pick, value, mode] of edits) {
      const paths = allPaths(p);
      if (paths.length) setPath(p, paths[pick % paths.length], own(value), mode);
    }
    return p;
  });

/** Big-but-legal and just-too-big collections: the cases where allocation could run away. */
const bulkyParams = fc
  .record({
    base: fc.nat(BASES.length - 1),
    bins: fc.option(fc.tuple(fc.integer({ min: 1, max: 70_000 }), fc.constantFrom(1, 1.5, -1, 'x')), { nil: undefined }),
    elevations: fc.option(fc.integer({ min: 0, max: 400 }), { nil: undefined }),
    saved: fc.option(fc.integer({ min: 0, max: 100 }), { nil: undefined }),
    step: fc.option(fc.constantFrom(1e-9, 1e-300, 5e-324, 0.01, 0.044, 0.045), { nil: undefined }),
  })
  .map(({ base, bins, elevations, saved, step }) => {
    const p = structuredClone(BASES[base]) as Record<string, unknown> & { beams: Record<string, unknown> };
    if (bins) {
      delete p.band;
      p.bins = Array.from({ length: bins[0] }, (_, i) => (typeof bins[1] === 'number' ? 1 + i * bins[1] : bins[1]));
    }
    if (elevations !== undefined) p.beams.elevationsDeg = Array.from({ length: elevations }, (_, i) => (i % 181) - 90 + (i >= 181 ? 0.5 : 0));
    if (saved !== undefined) p.savedBeams = Array.from({ length: saved }, (_, i) => ({ azimuthDeg: (p.beams.azimuthFromDeg as number) + i * (p.beams.azimuthStepDeg as number) }));
    if (step !== undefined) p.beams.azimuthStepDeg = step;
    return p;
  });

/**
 * fc.assert with a report short enough to read: the seed, the replay path and the start of the
 * counterexample (a 65 536-element bin list would otherwise fill the terminal).
 */
function check<T>(prop: fc.IPropertyWithHooks<T> | fc.IProperty<T>, numRuns: number): void {
  const out = fc.check(prop, { seed, numRuns });
  if (!out.failed) return;
  let example: string;
  try {
    example = JSON.stringify(out.counterexample, (_k, v: unknown) => (typeof v === 'bigint' ? `${v}n` : v)) ?? String(out.counterexample);
  } catch {
    example = String(out.counterexample);
  }
  const cause = out.errorInstance instanceof Error ? out.errorInstance.message : String(out.errorInstance);
  throw new Error(`property failed (seed ${out.seed}, path "${out.counterexamplePath}"): ${cause}\ncounterexample (first 3000 characters): ${example.slice(0, 3000)}`);
}

/** The text a caller is shown for a rejection (as the CLI prints it and the API puts it in its message). */
const problemText = (problems: ParamsProblem[]) => problems.map(formatParamsProblem).join('; ');

/** A problem is clear when it points at a field the input has (or its parent has) and says what is wrong. */
function expectClear(input: unknown, problems: ParamsProblem[]): void {
  expect(problems.length).to.be.greaterThan(0);
  expect(problemText(problems).length, 'the rejection text grows with the input').to.be.below(MAX_PROBLEMS_TEXT);
  for (const p of problems) {
    expect(p.message, JSON.stringify(p)).to.be.a('string').with.length.within(8, 600);
    expect(p.message.trim()).not.to.match(/^(Invalid input|Invalid|Required|Error)\.?$/);
    expect(p.path.every((k) => typeof k === 'string' || (Number.isInteger(k) && k >= 0)), JSON.stringify(p.path)).to.equal(true);
    // the path leads into the input: every step but the last exists (the last may be the missing field)
    let o: unknown = input;
    for (const k of p.path.slice(0, -1)) {
      expect(o !== null && typeof o === 'object', `problem path ${p.path.join('.')} leaves the input`).to.equal(true);
      o = (o as Record<string | number, unknown>)[k];
    }
  }
}

/** Everything derived from valid parameters stays in bounds, for every recording kind. */
function expectSaneLayout(params: BeamformParams): void {
  const fan = expandBeamFan(params.beams);
  expect(fan.azimuthsDeg.length).to.be.within(1, MAX_BEAMS);
  const saved = savedBeamIndices(params);
  expect(saved.every((i) => i >= 0 && i < fan.azimuthsDeg.length), 'a saved beam outside the fan').to.equal(true);
  // what was accepted re-parses to the same thing (a stored job reruns with identical parameters)
  // (compared as JSON text: a bin index of -0 is stored as 0, which is the same bin)
  const again = parseBeamformParams(JSON.parse(JSON.stringify(params)));
  expect(again.ok && JSON.stringify(again.params)).to.equal(JSON.stringify(params));
  for (const rec of RECORDINGS) {
    const problems = validateParamsAgainstRecording(params, rec, ARRAY, TRAINING);
    if (problems.length) {
      expectClear({ ...params, array: ARRAY, recording: rec, trainingRecording: TRAINING }, problems);
      continue;
    }
    const { bins } = selectBins(params, rec);
    expect(bins.length).to.be.greaterThan(0);
    const minBin = rec.complex ? 0 : 1;
    const maxBin = rec.complex ? params.nfft - 1 : params.nfft / 2 - 1;
    expect(bins.every((k) => k >= minBin && k <= maxBin), 'a selected bin outside the usable range').to.equal(true);
    const timing = windowTiming(params, rec);
    expect(timing.windows).to.be.at.least(1);
    expect(timing.firstSample + (timing.frames - 1) * params.hop + params.nfft).to.be.at.most(rec.totalFrames);
    const plan = trainingPlan(params, rec, TRAINING);
    for (const block of [plan.weights, plan.evaluation]) if (block) expect(block.frames).to.be.at.least(block === plan.weights ? 1 : 2);
    const size = { totalFrames: rec.totalFrames, channels: 8, nfft: params.nfft, hop: params.hop, snapshotsPerWindow: params.snapshotsPerWindow, windowHop: params.windowHop, bins: bins.length, beams: fan.azimuthsDeg.length, savedBeams: params.savedBeams.length };
    // the advisor's estimate (whole recording) agrees with the layout when no time range narrows it
    if (!params.timeRange) expect(countWindows(size).windows).to.equal(timing.windows);
    expect(Number.isFinite(estimateRunSeconds(size)) && estimateRunSeconds(size) >= 0).to.equal(true);
    expect(Number.isFinite(estimateOutputBytes(size)) && estimateOutputBytes(size) > 0).to.equal(true);
  }
}

/** One input through the whole pure path, within the hang and memory bounds. */
function survives(input: unknown): boolean {
  const heapBefore = process.memoryUsage().heapUsed;
  const t0 = performance.now();
  const r = parseBeamformParams(input);
  if (r.ok) expectSaneLayout(r.params);
  else expectClear(input, r.problems);
  expect(performance.now() - t0, 'one input took seconds: a hang').to.be.below(HANG_MS);
  // the largest legal input is 65 536 bins; nothing here needs more than a few tens of MB
  expect(process.memoryUsage().heapUsed - heapBefore, 'allocation out of proportion to the input').to.be.below(96 * 1024 * 1024);
  return true;
}

describe(`fuzzing the job parameters (fast-check seed ${seed}, ${RUNS} runs each)`, function () {
  this.timeout(180_000);
  before(() => console.log(`    fuzz seed: ${seed} (replay with FUZZ_SEED=${seed})`));

  it('the valid bases are valid and their layouts sane (sanity check of the fuzzer)', () => {
    for (const b of BASES) {
      const r = parseBeamformParams(b);
      expect(r.ok, JSON.stringify(!r.ok && r.problems)).to.equal(true);
      survives(b);
      // and each one can run on the ordinary recording
      expect(validateParamsAgainstRecording((r as { params: BeamformParams }).params, RECORDINGS[0], ARRAY, TRAINING)).to.deep.equal([]);
    }
  });

  it('arbitrary values of any type', () => {
    check(fc.property(fc.anything({ maxDepth: 3, withNullPrototype: true, withBigInt: true, withDate: true, withMap: true, withSet: true, withTypedArray: true, withSparseArray: true }), survives), RUNS);
  });

  it('valid parameter sets mutated at any depth (edge numbers, wrong types, deleted and unexpected keys)', () => {
    check(fc.property(mutatedParams, survives), RUNS * 2);
  });

  it('valid parameter sets with arbitrary JSON at the top-level fields', () => {
    const keys = ['schemaVersion', 'nfft', 'hop', 'window', 'band', 'bins', 'timeRange', 'snapshotsPerWindow', 'windowHop', 'estimator', 'loading', 'beamformer', 'beams', 'savedBeams', 'speedOfSoundMps'];
    check(
      fc.property(fc.nat(BASES.length - 1), fc.array(fc.tuple(fc.constantFrom(...keys), fc.jsonValue({ maxDepth: 3 })), { maxLength: 4 }), (b, edits) => {
        const p = structuredClone(BASES[b]);
        for (const [k, v] of edits) p[k] = v;
        return survives(p);
      }),
      RUNS,
    );
  });

  it('huge collections and degenerate fans: accepted within the limits, refused briefly beyond them', () => {
    check(fc.property(bulkyParams, survives), Math.max(20, RUNS / 50));
  });

  it('a 1 MB body of wrong bin values gives a short rejection, not one line per element', () => {
    const p = { ...structuredClone(BASES[0]), band: undefined, bins: Array.from({ length: 250_000 }, () => 0.5) };
    const r = parseBeamformParams(p);
    expect(r.ok).to.equal(false);
    if (!r.ok) expectClear(p, r.problems);
  });

  it('JSON text of mutated parameter files (what the CLI reads), including truncated and garbled text', () => {
    check(
      fc.property(mutatedParams, fc.nat(), fc.option(fc.tuple(fc.nat(), fc.string({ minLength: 1, maxLength: 1 })), { nil: undefined }), (p, cut, garble) => {
        let text = JSON.stringify(p) ?? 'null';
        if (cut % 3 === 0) text = text.slice(0, cut % (text.length + 1));
        if (garble) text = text.slice(0, garble[0] % (text.length + 1)) + garble[1] + text.slice(garble[0] % (text.length + 1));
        let value: unknown;
        try {
          value = JSON.parse(text);
        } catch {
          return true; // the CLI reports bad JSON itself before the schema sees it
        }
        return survives(value);
      }),
      RUNS,
    );
  });
});

describe(`fuzzing the parser entry points fuzz-formats.test.ts does not reach directly (seed ${seed})`, function () {
  this.timeout(120_000);
  const onlyFormatErrors = (fn: () => unknown) => {
    try {
      fn();
    } catch (e) {
      if (!(e instanceof RecordingFormatError)) throw e;
      expect(e.message.length).to.be.within(10, 2000);
    }
    return true;
  };

  it('parseSigmfDatatype: arbitrary strings and near-miss datatype names', () => {
    const nearMiss = fc
      .tuple(fc.constantFrom('r', 'c', 'R', 'C', '', 'rc'), fc.constantFrom('f', 'i', 'u', 'F', 'x', ''), fc.constantFrom('8', '16', '24', '32', '64', '0', '128', '-16', '1e1'), fc.constantFrom('', '_le', '_be', '_LE', '_me', '__le', '_le_'))
      .map((parts) => parts.join(''));
    check(fc.property(fc.oneof(fc.string({ maxLength: 40 }), nearMiss, fc.anything({ maxDepth: 1 })), (v) => onlyFormatErrors(() => parseSigmfDatatype(v, 'f.sigmf-meta', 'global.core:datatype'))), RUNS);
  });

  it('parseRawSidecar: arbitrary text and JSON of any shape', () => {
    check(fc.property(fc.oneof(fc.string({ maxLength: 300 }), fc.jsonValue({ maxDepth: 4 }).map((v) => JSON.stringify(v) ?? 'null')), fc.nat(1 << 30), (t, size) => onlyFormatErrors(() => parseRawSidecar(t, size, 'f.raw.json'))), RUNS);
  });
});
