import * as z from 'zod';

/**
 * An array description as files and the API carry it (array.json for the CLI, the Arrays
 * catalogue, job snapshots). Geometry per CONVENTIONS.md: metres, right-handed x, y, z;
 * a line array lies along x. Element order is the order of `elements`; output channels are
 * numbered from 0 in that order (excluded elements dropped).
 */
export const arrayElementSchema = z.object({
  /** Position in metres [x, y, z]. */
  position: z.tuple([z.number().finite(), z.number().finite(), z.number().finite()]),
  /** Which channel of the recording feeds this element (0-based). */
  channel: z.number().int().min(0, 'channel numbers start at 0'),
  /** Linear amplitude gain applied to this element's samples (calibration). */
  gain: z.number().finite().positive('gain must be a positive number').default(1),
  /** Excluded elements are read but not used (dead or noisy hydrophones). */
  excluded: z.boolean().default(false),
});

export const arrayGeometrySchema = z
  .object({
    name: z.string().trim().min(1, 'Give the array a name.').max(200),
    notes: z.string().max(5000).default(''),
    /** Propagation speed in m/s (CONVENTIONS.md presets: 1500 sea, 1481 fresh, 343 air, 299792458 radio). */
    speedOfSoundMps: z.number().finite().positive('speed of sound must be positive, in m/s'),
    elements: z.array(arrayElementSchema).min(1, 'An array needs at least one element.').max(1024, 'At most 1024 elements.'),
  })
  .superRefine((a, ctx) => {
    const seenChannels = new Set<number>();
    const seenPositions = new Set<string>();
    a.elements.forEach((e, i) => {
      if (seenChannels.has(e.channel)) {
        ctx.addIssue({ code: 'custom', path: ['elements', i, 'channel'], message: `Element ${i} reuses channel ${e.channel}; each element needs its own channel.` });
      }
      seenChannels.add(e.channel);
      const key = e.position.join(',');
      if (seenPositions.has(key)) {
        ctx.addIssue({ code: 'custom', path: ['elements', i, 'position'], message: `Element ${i} sits at the same position as an earlier element (${key} m).` });
      }
      seenPositions.add(key);
    });
    if (a.elements.every((e) => e.excluded)) {
      ctx.addIssue({ code: 'custom', path: ['elements'], message: 'Every element is excluded; keep at least one.' });
    }
  });

export type ArrayElement = z.infer<typeof arrayElementSchema>;
export type ArrayGeometry = z.infer<typeof arrayGeometrySchema>;

/** A uniform line array along x (element 0 at x = originX), channels in element order. */
export function lineArray(opts: { name: string; count: number; spacingM: number; speedOfSoundMps: number; originX?: number }): ArrayGeometry {
  const x0 = opts.originX ?? 0;
  return {
    name: opts.name,
    notes: '',
    speedOfSoundMps: opts.speedOfSoundMps,
    elements: Array.from({ length: opts.count }, (_, i) => ({
      position: [x0 + i * opts.spacingM, 0, 0] as [number, number, number],
      channel: i,
      gain: 1,
      excluded: false,
    })),
  };
}
