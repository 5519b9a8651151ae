import { boolean, doublePrecision, index, integer, jsonb, pgTable, serial, text } from 'drizzle-orm/pg-core';
import type { ArrayGeometry } from '../../../shared/arrays/array-geometry.js';
import type { ArrayMedium } from '../../../shared/api/arrays.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/**
 * The arrays catalogue. One row per version: an array that a job has used is never edited in
 * place; saving it writes a new row with the same `lineageId` and `version + 1` and clears
 * `current` on the old one, so old results keep the geometry they were computed with.
 * `lineageId` is the id of the first version.
 */
export const arrays = pgTable(
  'arrays',
  {
    id: serial().primaryKey(),
    lineageId: integer().notNull(),
    version: integer().notNull().default(1),
    current: boolean().notNull().default(true),
    name: text().notNull(),
    notes: text().notNull().default(''),
    /** Validated by shared/arrays/array-geometry.ts (positions, channel map, gains, exclusions, c). */
    geometry: jsonb().$type<ArrayGeometry>().notNull(),
    /** How the speed of sound was chosen (preset, sea water by Mackenzie 1981, custom). */
    medium: jsonb().$type<ArrayMedium>().notNull(),
    designFrequencyHz: doublePrecision(),
    createdBy: integer().references(() => users.id, { onDelete: 'set null' }),
    ...timestamps,
  },
  (t) => [index('arrays_lineage_idx').on(t.lineageId, t.version)],
);

export type ArrayRow = typeof arrays.$inferSelect;
