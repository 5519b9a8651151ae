import fs from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { count, eq } from 'drizzle-orm';
import { arrayGeometrySchema, type ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import type { ArrayMedium } from '../../shared/api/arrays.js';
import type { RecordingFormat } from '../../shared/api/recordings.js';
import type { AppContext } from '../context.js';
import { arrays } from '../db/schema/arrays.js';
import { recordings } from '../db/schema/recordings.js';
import { users } from '../db/schema/users.js';
import { rawSideFile } from '../recordings/archive-service.js';
import { recordingDir } from '../uploads/upload-paths.js';

/** Where the demo files live in the repo (written by `npm run samples`, small ones committed). */
export const DEMO_SAMPLES_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../samples/demo');

interface DemoFile {
  name: string;
  format: RecordingFormat;
  dataPath: string;
  sidecarPath: string | null;
}

/**
 * First start with DEMO_DATA=on and an empty catalogue: the demo array (samples/demo/array.json)
 * and the demo recordings (copied from samples/demo/ into DATA_DIR/recordings/<id>/, linked to
 * that array), each handed to inspection like any upload. A non-empty database is left alone.
 */
export async function seedDemoRecordings(ctx: AppContext): Promise<{ arrayId: number | null; recordingIds: number[] }> {
  const { db, logger, config } = ctx;
  const [{ n: recs }] = await db.select({ n: count() }).from(recordings);
  const [{ n: arrs }] = await db.select({ n: count() }).from(arrays);
  if (recs > 0 || arrs > 0) return { arrayId: null, recordingIds: [] };
  const files = await findDemoFiles(DEMO_SAMPLES_DIR);
  if (!files.length) {
    logger.warn(`no demo recordings in ${DEMO_SAMPLES_DIR}; run "npm run samples" to write them`);
    return { arrayId: null, recordingIds: [] };
  }
  const [owner] = await db.select({ id: users.id }).from(users).where(eq(users.role, 'admin')).limit(1);
  const arrayId = await seedDemoArray(ctx, owner?.id ?? null);
  const ids: number[] = [];
  for (const f of files) {
    const st = await fs.stat(f.dataPath);
    const sidecar = f.sidecarPath ? await fs.readFile(f.sidecarPath, 'utf8') : null;
    const [row] = await db
      .insert(recordings)
      .values({ name: f.name, source: 'demo', filePath: '', declaredFormat: f.format, sizeBytes: st.size, sidecar, state: 'inspecting', arrayId, uploadedBy: owner?.id ?? null })
      .returning({ id: recordings.id });
    const dir = recordingDir(config.dataDir, row.id);
    await fs.mkdir(dir, { recursive: true });
    const filePath = path.join(dir, path.basename(f.dataPath));
    await fs.copyFile(f.dataPath, filePath);
    let sidecarPath: string | null = null;
    if (f.sidecarPath) {
      sidecarPath = path.join(dir, path.basename(f.sidecarPath));
      await fs.copyFile(f.sidecarPath, sidecarPath);
    }
    await db.update(recordings).set({ filePath, sidecarPath }).where(eq(recordings.id, row.id));
    ids.push(row.id);
  }
  logger.info(`demo data: array ${arrayId} and ${ids.length} recording(s) added; inspecting them now`);
  // Inspection starts in the plugin's attach(), once the compute pool is up.
  return { arrayId, recordingIds: ids };
}

async function seedDemoArray(ctx: AppContext, ownerId: number | null): Promise<number | null> {
  let geometry: ArrayGeometry;
  try {
    geometry = arrayGeometrySchema.parse(JSON.parse(await fs.readFile(path.join(DEMO_SAMPLES_DIR, 'array.json'), 'utf8')));
  } catch (err) {
    ctx.logger.warn('demo array.json missing or invalid; demo recordings stay unlinked', { error: String(err) });
    return null;
  }
  const medium: ArrayMedium = geometry.speedOfSoundMps === 1500 ? { kind: 'preset', preset: 'sea-water' } : { kind: 'custom' };
  const [row] = await ctx.db
    .insert(arrays)
    .values({ lineageId: 0, name: geometry.name, notes: geometry.notes, geometry, medium, designFrequencyHz: null, createdBy: ownerId })
    .returning({ id: arrays.id });
  await ctx.db.update(arrays).set({ lineageId: row.id }).where(eq(arrays.id, row.id));
  return row.id;
}

/** Data files in the demo folder, with their side files. */
async function findDemoFiles(dir: string): Promise<DemoFile[]> {
  let names: string[];
  try {
    names = (await fs.readdir(dir)).sort();
  } catch {
    return [];
  }
  const out: DemoFile[] = [];
  for (const n of names) {
    const lower = n.toLowerCase();
    const full = path.join(dir, n);
    if (lower.endsWith('.wav') || lower.endsWith('.rf64')) out.push({ name: n, format: lower.endsWith('.rf64') ? 'rf64' : 'wav', dataPath: full, sidecarPath: null });
    else if (lower.endsWith('.sigmf-data')) out.push({ name: n, format: 'sigmf', dataPath: full, sidecarPath: full.replace(/\.sigmf-data$/i, '.sigmf-meta') });
    else if (/\.(raw|bin)$/.test(lower)) {
      const side = await rawSideFile(full);
      if (names.includes(path.basename(side))) out.push({ name: n, format: 'raw', dataPath: full, sidecarPath: side });
    }
  }
  return out;
}
