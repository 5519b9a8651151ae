import { pgTable, serial, text } from 'drizzle-orm/pg-core';
import { timestamps } from './timestamps.js';

/**
 * Server-side folders an admin opened for in-place registration. `path` is stored as the
 * realpath at creation time; every browse and register call re-resolves it, so a root later
 * replaced by a symlink cannot widen what analysts reach.
 */
export const archiveRoots = pgTable('archive_roots', {
  id: serial().primaryKey(),
  name: text().notNull(),
  path: text().notNull().unique(),
  notes: text().notNull().default(''),
  ...timestamps,
});

export type ArchiveRootRow = typeof archiveRoots.$inferSelect;
