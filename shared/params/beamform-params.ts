import * as z from 'zod';

/**
 * Parameters of one beamforming job, as the browser, the API, the queue and the CLI
 * (params.json) carry them. Versioned: a stored job keeps the version it was made with, and a
 * reader refuses versions it does not know instead of guessing. Pure zod, no Node imports, so
 * the browser validates a form with the same rules the server enforces.
 *
 * Checks that need the recording or the array (Nyquist, channel counts, time ranges inside the
 * file, enough frames for K) live in validate-against-recording.ts.
 */
export const BEAMFORM_PARAMS_VERSION = 1 as const;

const isPowerOfTwo = (n: number): boolean => Number.isInteger(n) && n > 0 && (n & (n - 1)) === 0;

const seconds = (what: string) =>
  z.number({ error: `${what} must be a number of seconds` }).finite(`${what} must be a finite number of seconds`).min(0, `${what} cannot be negative`);

/** A span of the recording in seconds from its first sample. */
export const timeRangeSchema = z
  .object({ startS: seconds('startS'), endS: seconds('endS') })
  .refine((r) => r.endS > r.startS, { message: 'endS must be later than startS', path: ['endS'] });
export type TimeRange = z.infer<typeof timeRangeSchema>;

const loadingLevelDb = z
  .number({ error: 'levelDb must be a number of dB' })
  .finite('levelDb must be finite')
  .min(-100, 'levelDb below −100 dB is indistinguishable from no loading; use kind "none"')
  .max(60, 'levelDb above +60 dB turns the beamformer into a conventional one; use kind "conventional" instead');

/** The engine's LoadingRule (worker/dsp/window-engine.types.ts) as a schema. */
export const loadingRuleSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('none') }),
    z.object({ kind: z.literal('trace'), levelDb: loadingLevelDb }),
    z.object({ kind: z.literal('noise-floor'), levelDb: loadingLevelDb }),
    z.object({ kind: z.literal('ledoit-wolf') }),
    z.object({
      kind: z.literal('wng-floor'),
      minWngDb: z.number({ error: 'minWngDb must be a number of dB' }).finite('minWngDb must be finite').min(-60, 'minWngDb below −60 dB constrains nothing; use another loading rule'),
    }),
  ],
  { error: 'loading.kind must be one of "none", "trace", "noise-floor", "ledoit-wolf", "wng-floor"' },
);

/** MVDR needs signal-absent training data: a range of this recording, or another recording. */
export const mvdrTrainingSchema = z.discriminatedUnion(
  'source',
  [
    z.object({ source: z.literal('range'), startS: seconds('training.startS'), endS: seconds('training.endS') }).refine((r) => r.endS > r.startS, {
      message: 'training.endS must be later than training.startS',
      path: ['endS'],
    }),
    z.object({
      source: z.literal('recording'),
      recordingRef: z.string({ error: 'recordingRef must name the noise-only recording' }).trim().min(1, 'recordingRef must name the noise-only recording'),
      /** Optional part of that recording; the whole recording when absent. */
      range: timeRangeSchema.optional(),
    }),
  ],
  { error: 'training.source must be "range" (a noise-only span of this recording) or "recording" (a separate noise-only recording)' },
);

export const beamformerSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('mvdr'), training: mvdrTrainingSchema }),
    /** noiseRange: optional noise-only span used only to evaluate P̂n for the SINR estimate. */
    z.object({ kind: z.literal('mpdr'), noiseRange: timeRangeSchema.optional() }),
    z.object({ kind: z.literal('conventional') }),
  ],
  { error: 'beamformer.kind must be "mvdr", "mpdr" or "conventional"' },
);

const degrees = (what: string, lo: number, hi: number) =>
  z.number({ error: `${what} must be a number of degrees` }).finite(`${what} must be finite`).min(lo, `${what} must be ≥ ${lo}°`).max(hi, `${what} must be ≤ ${hi}°`);

export const MAX_BEAMS = 4096;
export const MAX_SAVED_BEAMS = 64;

/** The fan of look directions: azimuths from..to by step (inclusive), for each elevation. */
export const beamFanSchema = z
  .object({
    azimuthFromDeg: degrees('azimuthFromDeg', -180, 180),
    azimuthToDeg: degrees('azimuthToDeg', -180, 180),
    azimuthStepDeg: z.number({ error: 'azimuthStepDeg must be a number of degrees' }).finite().positive('azimuthStepDeg must be greater than 0').max(360),
    elevationsDeg: z.array(degrees('elevation', -90, 90)).min(1, 'give at least one elevation (0 for a horizontal fan)').max(181).default([0]),
  })
  .superRefine((f, ctx) => {
    if (f.azimuthToDeg < f.azimuthFromDeg) {
      ctx.addIssue({ code: 'custom', path: ['azimuthToDeg'], message: 'azimuthToDeg must not be smaller than azimuthFromDeg' });
      return;
    }
    const count = azimuthCount(f) * f.elevationsDeg.length;
    if (count > MAX_BEAMS) {
      ctx.addIssue({ code: 'custom', path: ['azimuthStepDeg'], message: `the fan has ${count} beams; at most ${MAX_BEAMS} are allowed — use a coarser step or fewer elevations` });
    }
  });
export type BeamFan = z.infer<typeof beamFanSchema>;

/** Number of azimuths in a fan: from, from+step, … up to and including `to` (1e-9° tolerance). */
export function azimuthCount(f: { azimuthFromDeg: number; azimuthToDeg: number; azimuthStepDeg: number }): number {
  return Math.floor((f.azimuthToDeg - f.azimuthFromDeg) / f.azimuthStepDeg + 1e-9) + 1;
}

export const savedBeamSchema = z.object({
  azimuthDeg: degrees('azimuthDeg', -180, 180),
  elevationDeg: degrees('elevationDeg', -90, 90).default(0),
});
export type SavedBeam = z.infer<typeof savedBeamSchema>;

export const estimatorSchema = z.discriminatedUnion(
  'kind',
  [
    /** R̂ = (1/K)·Σ x·xᴴ over the window's K snapshots. */
    z.object({ kind: z.literal('sliding') }),
    /**
     * Exponential forgetting R_m = α·R_{m−1} + (1−α)·x·xᴴ, evaluated over the window's K
     * snapshots (the recursion started K frames earlier, renormalised to unit total weight).
     */
    z.object({ kind: z.literal('exponential'), alpha: z.number({ error: 'alpha must be a number' }).gt(0, 'alpha must be greater than 0').lt(1, 'alpha must be less than 1') }),
  ],
  { error: 'estimator.kind must be "sliding" or "exponential"' },
);

const binIndex = z.number({ error: 'bins must be integers' }).int('bins must be integers').min(0, 'bin indices start at 0');

export const beamformParamsSchema = z
  .object({
    schemaVersion: z.literal(BEAMFORM_PARAMS_VERSION, { error: `schemaVersion must be ${BEAMFORM_PARAMS_VERSION} (this Nullsmith reads parameter files of version ${BEAMFORM_PARAMS_VERSION})` }),
    nfft: z.number({ error: 'nfft must be a number' }).int('nfft must be an integer').min(64, 'nfft must be at least 64').max(65536, 'nfft must be at most 65536').refine(isPowerOfTwo, 'nfft must be a power of two (64, 128, …, 65536)'),
    hop: z.number({ error: 'hop must be a number of samples' }).int('hop must be a whole number of samples').min(1, 'hop must be at least 1 sample'),
    window: z.enum(['hann', 'hamming', 'blackman'], { error: 'window must be "hann", "hamming" or "blackman"' }).default('hann'),
    /** Either a band in Hz (every bin whose frequency lies inside it) or explicit bin indices. */
    band: z
      .object({ fLoHz: z.number({ error: 'fLoHz must be a frequency in Hz' }).finite(), fHiHz: z.number({ error: 'fHiHz must be a frequency in Hz' }).finite() })
      .refine((b) => b.fHiHz > b.fLoHz, { message: 'fHiHz must be above fLoHz', path: ['fHiHz'] })
      .optional(),
    bins: z.array(binIndex).min(1, 'give at least one bin').max(65536).optional(),
    /** Part of the recording to process; the whole recording when absent. */
    timeRange: timeRangeSchema.optional(),
    snapshotsPerWindow: z.number({ error: 'snapshotsPerWindow must be a number' }).int('snapshotsPerWindow (K) must be an integer').min(1, 'snapshotsPerWindow (K) must be at least 1').max(100000, 'snapshotsPerWindow (K) must be at most 100000'),
    windowHop: z.number({ error: 'windowHop must be a number of frames' }).int('windowHop must be a whole number of frames').min(1, 'windowHop must be at least 1 frame'),
    estimator: estimatorSchema.default({ kind: 'sliding' }),
    loading: loadingRuleSchema,
    beamformer: beamformerSchema,
    beams: beamFanSchema,
    savedBeams: z.array(savedBeamSchema).max(MAX_SAVED_BEAMS, `at most ${MAX_SAVED_BEAMS} beams can have their weights saved`).default([]),
    /** Overrides the array's propagation speed for this job (m/s). */
    speedOfSoundMps: z.number({ error: 'speedOfSoundMps must be a number in m/s' }).finite().positive('speedOfSoundMps must be positive, in m/s').optional(),
  })
  .superRefine((p, ctx) => {
    if (p.hop > p.nfft) {
      ctx.addIssue({ code: 'custom', path: ['hop'], message: `hop (${p.hop}) must not exceed nfft (${p.nfft}); otherwise samples between frames are never analysed` });
    }
    if ((p.band === undefined) === (p.bins === undefined)) {
      ctx.addIssue({ code: 'custom', path: ['band'], message: 'give exactly one of "band" ({ fLoHz, fHiHz }) or "bins" (a list of bin indices)' });
    }
    if (p.bins && new Set(p.bins).size !== p.bins.length) {
      ctx.addIssue({ code: 'custom', path: ['bins'], message: 'bins contains duplicates; list each bin once' });
    }
    if (p.beamformer.kind === 'conventional' && p.loading.kind !== 'none') {
      ctx.addIssue({ code: 'custom', path: ['loading'], message: 'conventional beams take no diagonal loading; set loading to { "kind": "none" }' });
    }
    p.savedBeams.forEach((b, i) => {
      if (findBeamIndex(p.beams, b) < 0) {
        ctx.addIssue({
          code: 'custom',
          path: ['savedBeams', i],
          message: `saved beam ${b.azimuthDeg}° az / ${b.elevationDeg}° el is not in the beam fan (${p.beams.azimuthFromDeg}° to ${p.beams.azimuthToDeg}° by ${p.beams.azimuthStepDeg}°, elevations ${listElevations(p.beams.elevationsDeg)}); pick an azimuth from the fan`,
        });
      }
    });
    const keys = p.savedBeams.map((b) => findBeamIndex(p.beams, b));
    if (new Set(keys).size !== keys.length) {
      ctx.addIssue({ code: 'custom', path: ['savedBeams'], message: 'savedBeams lists the same beam twice' });
    }
  });

/** "0, 10°", or "181 from −90° to 90°" when the list is long (messages stay one readable line). */
function listElevations(els: number[]): string {
  return els.length <= 6 ? `${els.join(', ')}°` : `${els.length} from ${Math.min(...els)}° to ${Math.max(...els)}°`;
}

export type BeamformParams = z.infer<typeof beamformParamsSchema>;
/** What a caller may write (defaults not yet applied). */
export type BeamformParamsInput = z.input<typeof beamformParamsSchema>;

/** Tolerance when matching a saved beam against the fan (degrees). */
const BEAM_MATCH_TOL_DEG = 1e-6;

/**
 * Index of a direction in the fan, or −1. Beam order is elevation-major:
 * beam = e·nAz + a, azimuth a·step + from.
 */
export function findBeamIndex(fan: BeamFan, beam: { azimuthDeg: number; elevationDeg: number }): number {
  const nAz = azimuthCount(fan);
  const a = Math.round((beam.azimuthDeg - fan.azimuthFromDeg) / fan.azimuthStepDeg);
  if (a < 0 || a >= nAz) return -1;
  if (Math.abs(fan.azimuthFromDeg + a * fan.azimuthStepDeg - beam.azimuthDeg) > BEAM_MATCH_TOL_DEG) return -1;
  const e = fan.elevationsDeg.findIndex((el) => Math.abs(el - beam.elevationDeg) <= BEAM_MATCH_TOL_DEG);
  return e < 0 ? -1 : e * nAz + a;
}

/**
 * At most this many problems are reported for one input: a list of 250 000 wrong bin values
 * would otherwise give a multi-megabyte answer (one line per element) that nobody reads.
 */
export const MAX_REPORTED_PROBLEMS = 25;

/** Parses unknown input into parameters, or a list of problems with field paths. */
export function parseBeamformParams(input: unknown): { ok: true; params: BeamformParams } | { ok: false; problems: ParamsProblem[] } {
  const r = beamformParamsSchema.safeParse(input);
  if (r.success) return { ok: true, params: r.data };
  const problems: ParamsProblem[] = r.error.issues.slice(0, MAX_REPORTED_PROBLEMS).map((i) => ({ path: i.path.map((p) => (typeof p === 'symbol' ? String(p) : p)), message: i.message }));
  const more = r.error.issues.length - problems.length;
  if (more > 0) problems.push({ path: [], message: `and ${more} more problem${more === 1 ? '' : 's'} like these; fix the ones listed and check again` });
  return { ok: false, problems };
}

/** One thing wrong with a job's parameters, located by a field path such as ['band', 'fHiHz']. */
export interface ParamsProblem {
  path: (string | number)[];
  message: string;
}

/** "band.fHiHz: message" — for CLI output and logs. */
export function formatParamsProblem(p: ParamsProblem): string {
  return p.path.length ? `${p.path.join('.')}: ${p.message}` : p.message;
}
