import * as z from 'zod';
import { arrayGeometrySchema, type ArrayGeometry } from '../arrays/array-geometry.js';
import { SPEED_PRESETS } from '../physics/sound-speed.js';

/** Speed-of-sound presets of CONVENTIONS.md, in m/s, with the labels the array form shows. */
export const MEDIUM_PRESETS = {
  'sea-water': { label: 'Sea water', speedMps: SPEED_PRESETS.sea },
  'fresh-water': { label: 'Fresh water (20 °C)', speedMps: SPEED_PRESETS.fresh },
  air: { label: 'Air (20 °C)', speedMps: SPEED_PRESETS.air },
  radio: { label: 'Radio (free space)', speedMps: SPEED_PRESETS.radio },
} as const;
export type MediumPreset = keyof typeof MEDIUM_PRESETS;

/**
 * How the array's speed of sound was chosen. 'sea-water-profile' derives it from temperature,
 * salinity and depth by Mackenzie (1981); the server recomputes it and stores the result in
 * geometry.speedOfSoundMps, so the two can never disagree.
 */
export const arrayMediumSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('preset'), preset: z.enum(Object.keys(MEDIUM_PRESETS) as [MediumPreset, ...MediumPreset[]], { error: `preset must be one of ${Object.keys(MEDIUM_PRESETS).join(', ')}` }) }),
    z.object({
      kind: z.literal('sea-water-profile'),
      temperatureC: z.number({ error: 'temperature must be a number in °C' }).finite().min(-2, 'temperature below −2 °C is outside Mackenzie (1981)').max(30, 'temperature above 30 °C is outside Mackenzie (1981)'),
      salinityPsu: z.number({ error: 'salinity must be a number in ‰' }).finite().min(25, 'salinity below 25 ‰ is outside Mackenzie (1981)').max(40, 'salinity above 40 ‰ is outside Mackenzie (1981)'),
      depthM: z.number({ error: 'depth must be a number in metres' }).finite().min(0, 'depth must be 0 m or more').max(8000, 'depth beyond 8000 m is outside Mackenzie (1981)'),
    }),
    z.object({ kind: z.literal('custom') }),
  ],
  { error: 'medium.kind must be preset, sea-water-profile or custom' },
);
export type ArrayMedium = z.infer<typeof arrayMediumSchema>;

/** POST /api/arrays and PUT /api/arrays/:id body. */
export const arrayRequestSchema = z.object({
  geometry: arrayGeometrySchema,
  medium: arrayMediumSchema.default({ kind: 'custom' }),
  designFrequencyHz: z.number().finite().positive('design frequency must be positive, in Hz').nullable().default(null),
});
export type ArrayRequest = z.input<typeof arrayRequestSchema>;
export type ArrayRequestParsed = z.infer<typeof arrayRequestSchema>;

/** An array version as the API shows it. */
export interface ArrayRecord {
  id: number;
  lineageId: number;
  version: number;
  current: boolean;
  name: string;
  notes: string;
  geometry: ArrayGeometry;
  medium: ArrayMedium;
  designFrequencyHz: number | null;
  /** Channels the array reads: highest mapped channel + 1. */
  channelsNeeded: number;
  /** Jobs that used this version (a saved edit then creates a new version). */
  jobCount: number;
  recordingCount: number;
  createdAt: string;
  updatedAt: string;
}

/** Channels a recording needs for this geometry: highest channel in the map + 1. */
export function channelsNeeded(g: Pick<ArrayGeometry, 'elements'>): number {
  return g.elements.reduce((m, e) => Math.max(m, e.channel + 1), 0);
}

/**
 * Highest frequency free of spatial aliasing, c / (2·d_min), with d_min the smallest distance
 * between two active elements (DOMAIN.md §5, d ≤ λ/2; common practice). For a uniform line
 * array this is exact; for irregular geometries it is a necessary condition only.
 * Returns Infinity for a single active element.
 */
export function aliasingLimitHz(g: Pick<ArrayGeometry, 'elements' | 'speedOfSoundMps'>): number {
  const active = g.elements.filter((e) => !e.excluded).map((e) => e.position);
  let dMin = Infinity;
  for (let i = 0; i < active.length; i++) {
    for (let j = i + 1; j < active.length; j++) {
      const d = Math.hypot(active[i][0] - active[j][0], active[i][1] - active[j][1], active[i][2] - active[j][2]);
      if (d > 0 && d < dMin) dMin = d;
    }
  }
  return Number.isFinite(dMin) ? g.speedOfSoundMps / (2 * dMin) : Infinity;
}
