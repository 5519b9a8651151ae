import { and, asc, count, desc, eq, inArray, sql } from 'drizzle-orm';
import { MEDIUM_PRESETS, channelsNeeded, type ArrayMedium, type ArrayRecord, type ArrayRequestParsed } from '../../shared/api/arrays.js';
import type { SessionUser } from '../../shared/api/auth.js';
import type { AppDb } from '../db/client.js';
import { arrays, type ArrayRow } from '../db/schema/arrays.js';
import { jobs } from '../db/schema/jobs.js';
import { recordings } from '../db/schema/recordings.js';
import { badRequest, conflict, notFound } from '../http/http-error.js';

/** Speed of sound in sea water from temperature (°C), salinity (‰) and depth (m). */
export type SeaWaterSpeed = (temperatureC: number, salinityPsu: number, depthM: number) => number;

/**
 * The arrays catalogue. Saving an array that a job used writes a new version row (same
 * lineage) instead of changing the old one, so old results keep their geometry; linked
 * recordings follow the lineage to the new version.
 */
export class ArrayService {
  constructor(private readonly db: AppDb, private readonly seaWaterSpeed: SeaWaterSpeed) {}

  async list(includeHistory: boolean): Promise<ArrayRecord[]> {
    const rows = await this.db
      .select()
      .from(arrays)
      .where(includeHistory ? undefined : eq(arrays.current, true))
      .orderBy(asc(arrays.name), desc(arrays.version));
    return this.withUsage(rows);
  }

  async get(id: number): Promise<ArrayRecord> {
    return (await this.withUsage([await this.row(id)]))[0];
  }

  /** Every version of an array's lineage, newest first. */
  async history(id: number): Promise<ArrayRecord[]> {
    const row = await this.row(id);
    const rows = await this.db.select().from(arrays).where(eq(arrays.lineageId, row.lineageId)).orderBy(desc(arrays.version));
    return this.withUsage(rows);
  }

  async create(req: ArrayRequestParsed, user: SessionUser): Promise<ArrayRecord> {
    const values = this.normalise(req);
    const id = await this.db.transaction(async (tx) => {
      const [row] = await tx.insert(arrays).values({ ...values, lineageId: 0, version: 1, createdBy: user.id }).returning({ id: arrays.id });
      await tx.update(arrays).set({ lineageId: row.id }).where(eq(arrays.id, row.id));
      return row.id;
    });
    return this.get(id);
  }

  /** Saves an edit: in place while no job used this version, otherwise as a new version. */
  async update(id: number, req: ArrayRequestParsed, user: SessionUser): Promise<ArrayRecord> {
    const old = await this.row(id);
    if (!old.current) {
      const [cur] = await this.db.select({ id: arrays.id, version: arrays.version }).from(arrays).where(and(eq(arrays.lineageId, old.lineageId), eq(arrays.current, true)));
      throw conflict(`Version ${old.version} of "${old.name}" is history; edit the current version (v${cur?.version ?? '?'}, id ${cur?.id ?? '?'}) instead.`);
    }
    const values = this.normalise(req);
    const needed = channelsNeeded(values.geometry);
    const linked = await this.db.select({ id: recordings.id, name: recordings.name, channels: recordings.channels }).from(recordings).where(eq(recordings.arrayId, id));
    const tooSmall = linked.filter((r) => r.channels !== null && r.channels < needed);
    if (tooSmall.length) {
      throw conflict(`The new channel map reads channel ${needed - 1}, but linked recording${tooSmall.length > 1 ? 's' : ''} ${tooSmall.map((r) => `${r.name} (${r.channels} channels)`).join(', ')} ${tooSmall.length > 1 ? 'have' : 'has'} fewer. Unlink them first or keep the map within their channels.`);
    }
    const [{ used }] = await this.db.select({ used: count() }).from(jobs).where(eq(jobs.arrayId, id));
    if (used === 0) {
      await this.db.update(arrays).set({ ...values, updatedAt: sql`now()` }).where(eq(arrays.id, id));
      return this.get(id);
    }
    const newId = await this.db.transaction(async (tx) => {
      await tx.update(arrays).set({ current: false, updatedAt: sql`now()` }).where(eq(arrays.id, id));
      const [row] = await tx
        .insert(arrays)
        .values({ ...values, lineageId: old.lineageId, version: old.version + 1, current: true, createdBy: user.id })
        .returning({ id: arrays.id });
      await tx.update(recordings).set({ arrayId: row.id, updatedAt: sql`now()` }).where(eq(recordings.arrayId, id));
      return row.id;
    });
    return this.get(newId);
  }

  /** Deletes every version of an array no job used and no recording links. */
  async remove(id: number): Promise<void> {
    const row = await this.row(id);
    const versions = (await this.db.select({ id: arrays.id }).from(arrays).where(eq(arrays.lineageId, row.lineageId))).map((v) => v.id);
    const [{ used }] = await this.db.select({ used: count() }).from(jobs).where(inArray(jobs.arrayId, versions));
    if (used > 0) throw conflict(`"${row.name}" was used by ${used} job${used === 1 ? '' : 's'}; it stays in the catalogue so their results keep their geometry.`);
    const [{ linked }] = await this.db.select({ linked: count() }).from(recordings).where(inArray(recordings.arrayId, versions));
    if (linked > 0) throw conflict(`"${row.name}" is linked to ${linked} recording${linked === 1 ? '' : 's'}; unlink ${linked === 1 ? 'it' : 'them'} first.`);
    await this.db.delete(arrays).where(eq(arrays.lineageId, row.lineageId));
  }

  /** Stores the speed the medium implies in the geometry, so the two never disagree. */
  private normalise(req: ArrayRequestParsed) {
    const speed = this.speedFor(req.medium, req.geometry.speedOfSoundMps);
    return {
      name: req.geometry.name,
      notes: req.geometry.notes,
      geometry: { ...req.geometry, speedOfSoundMps: speed },
      medium: req.medium,
      designFrequencyHz: req.designFrequencyHz,
    };
  }

  private speedFor(medium: ArrayMedium, given: number): number {
    switch (medium.kind) {
      case 'preset':
        return MEDIUM_PRESETS[medium.preset].speedMps;
      case 'sea-water-profile': {
        let c: number;
        try {
          c = this.seaWaterSpeed(medium.temperatureC, medium.salinityPsu, medium.depthM);
        } catch (err) {
          throw badRequest(err instanceof Error ? `${err.message}.` : String(err));
        }
        if (!Number.isFinite(c) || c <= 0) throw badRequest('The sea-water profile gives no valid speed of sound; check temperature, salinity and depth.');
        return Math.round(c * 1000) / 1000;
      }
      case 'custom':
        return given;
    }
  }

  private async row(id: number): Promise<ArrayRow> {
    const [row] = await this.db.select().from(arrays).where(eq(arrays.id, id));
    if (!row) throw notFound(`There is no array ${id}. It may have been deleted; reload the catalogue.`);
    return row;
  }

  private async withUsage(rows: ArrayRow[]): Promise<ArrayRecord[]> {
    if (!rows.length) return [];
    const ids = rows.map((r) => r.id);
    const jobCounts = await this.db.select({ id: jobs.arrayId, n: count() }).from(jobs).where(inArray(jobs.arrayId, ids)).groupBy(jobs.arrayId);
    const recCounts = await this.db.select({ id: recordings.arrayId, n: count() }).from(recordings).where(inArray(recordings.arrayId, ids)).groupBy(recordings.arrayId);
    const jobsBy = new Map(jobCounts.map((j) => [j.id, j.n]));
    const recsBy = new Map(recCounts.map((r) => [r.id, r.n]));
    return rows.map((r) => ({
      id: r.id,
      lineageId: r.lineageId,
      version: r.version,
      current: r.current,
      name: r.name,
      notes: r.notes,
      geometry: r.geometry,
      medium: r.medium,
      designFrequencyHz: r.designFrequencyHz,
      channelsNeeded: channelsNeeded(r.geometry),
      jobCount: jobsBy.get(r.id) ?? 0,
      recordingCount: recsBy.get(r.id) ?? 0,
      createdAt: r.createdAt.toISOString(),
      updatedAt: r.updatedAt.toISOString(),
    }));
  }
}
