import * as z from 'zod';
import { windowSummarySchema } from './live.js';

/**
 * Plot data of a job's results (GET /api/plots/:jobId/...), read from the job's result files.
 * Powers and SINR are in dB with the CSV's rounding, null where the CSV leaves a field empty,
 * so a plot shows exactly what a download holds.
 */

/** GET /api/plots/:id/run: what the run was (parameters, setup, inputs, software). */
export const runInfoSchema = z.object({
  jobId: z.number().int(),
  product: z.string(),
  conventionsVersion: z.string(),
  caution: z.string(),
  params: z.record(z.string(), z.unknown()),
  recording: z.object({ sampleRate: z.number(), channels: z.number(), complex: z.boolean(), centerFrequencyHz: z.number(), totalFrames: z.number() }),
  setup: z.object({
    channels: z.number().int(),
    positionsM: z.array(z.tuple([z.number(), z.number(), z.number()])),
    speedMps: z.number(),
    bins: z.array(z.number().int()),
    binFreqsHz: z.array(z.number()),
    azimuthsDeg: z.array(z.number()),
    elevationsDeg: z.array(z.number()),
    savedBeams: z.array(z.number().int()),
    beamformer: z.string(),
    loading: z.record(z.string(), z.unknown()),
    snapshotsPerWindow: z.number().int(),
    effectiveSnapshots: z.number(),
  }),
  timing: z.record(z.string(), z.unknown()),
  meta: z.record(z.string(), z.unknown()),
  windowsStored: z.number().int(),
  totalWindows: z.number().int(),
});
export type RunInfo = z.infer<typeof runInfoSchema>;

/** GET /api/plots/:id/windows?fromWindow&toWindow&stride */
export const windowsPageSchema = z.object({
  jobId: z.number().int(),
  windowsStored: z.number().int(),
  totalWindows: z.number().int(),
  windows: z.array(windowSummarySchema),
});
export type WindowsPage = z.infer<typeof windowsPageSchema>;

/** GET /api/plots/:id/eigen?window&bin: sorted eigenvalues of R̂ and the Marchenko–Pastur band. */
export const eigenSpectrumSchema = z.object({
  window: z.number().int(),
  bin: z.number().int(),
  freqHz: z.number(),
  /** Descending, linear power. */
  eigenvalues: z.array(z.number()),
  /** σ̂_w² the engine estimated, and the MP band σ̂_w²(1 ± √(N/K))² (K_eff under forgetting). */
  noiseFloor: z.number(),
  mpLower: z.number(),
  mpUpper: z.number(),
  aboveEdge: z.number().int(),
  conditionNumber: z.number().nullable(),
  loading: z.number(),
  n: z.number().int(),
  k: z.number(),
});
export type EigenSpectrum = z.infer<typeof eigenSpectrumSchema>;

/** GET /api/plots/:id/weights?window&bin&beam: one saved beam's complex weights (as weights.csv holds them). */
export const beamWeightsSchema = z.object({
  window: z.number().int(),
  bin: z.number().int(),
  beam: z.number().int(),
  freqHz: z.number(),
  azimuthDeg: z.number(),
  elevationDeg: z.number(),
  speedMps: z.number(),
  positionsM: z.array(z.tuple([z.number(), z.number(), z.number()])),
  /** Per element channel: [re, im], the CSV's 7 significant digits. */
  weights: z.array(z.tuple([z.number(), z.number()])),
});
export type BeamWeights = z.infer<typeof beamWeightsSchema>;

/** GET /api/plots/:id/table?fromWindow&toWindow: one row per window. */
export const windowRowSchema = z.object({
  window: z.number().int(),
  tStartS: z.number(),
  tEndS: z.number(),
  peakAzimuthDeg: z.number().nullable(),
  peakPowerDb: z.number().nullable(),
  bestSinrDb: z.number().nullable(),
  bestSinrAzimuthDeg: z.number().nullable(),
  /** Largest count over the bins of eigenvalues above the MP edge (a rough source count). */
  maxAboveEdge: z.number().int(),
  /** Bins whose covariance was not positive definite. */
  singularBins: z.number().int(),
});
export const windowTableSchema = z.object({ windowsStored: z.number().int(), rows: z.array(windowRowSchema) });
export type WindowRow = z.infer<typeof windowRowSchema>;
