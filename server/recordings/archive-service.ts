import fs from 'node:fs/promises';
import path from 'node:path';
import { count, eq, inArray } from 'drizzle-orm';
import type { SessionUser } from '../../shared/api/auth.js';
import type { ArchiveEntry, ArchiveListing, ArchiveRegisterRequest, ArchiveRegisterResult, ArchiveRoot, ArchiveRootRequest } from '../../shared/api/recordings.js';
import type { RecordingFormat } from '../../shared/api/recordings.js';
import type { AppDb } from '../db/client.js';
import { archiveRoots, type ArchiveRootRow } from '../db/schema/archive-roots.js';
import { recordings } from '../db/schema/recordings.js';
import { badRequest, conflict, notFound } from '../http/http-error.js';
import { isInside, patternToRegExp, resolveInsideRoot } from './archive-paths.js';

/** A folder registration walks at most this many files, so a mistaken root cannot hang the server. */
const MAX_WALK = 20_000;
/** At most this many recordings per register request. */
const MAX_REGISTER = 2_000;

/**
 * Archive roots: server-side folders whose files are registered in place (no copy). All
 * path checks compare realpaths, so `..`, absolute paths and escaping symlinks are refused.
 */
export class ArchiveService {
  constructor(private readonly db: AppDb) {}

  async listRoots(): Promise<ArchiveRoot[]> {
    const rows = await this.db.select().from(archiveRoots).orderBy(archiveRoots.name);
    const counts = await this.db.select({ id: recordings.archiveRootId, n: count() }).from(recordings).where(inArray(recordings.archiveRootId, rows.map((r) => r.id).concat(-1))).groupBy(recordings.archiveRootId);
    const by = new Map(counts.map((c) => [c.id, c.n]));
    return Promise.all(rows.map(async (r) => ({ ...toRoot(r), recordingCount: by.get(r.id) ?? 0, reachable: await isDirectory(r.path) })));
  }

  async addRoot(req: ArchiveRootRequest): Promise<ArchiveRoot> {
    if (!path.isAbsolute(req.path)) throw badRequest(`${req.path} is not an absolute path; give the folder's full path on the server, e.g. /srv/survey-archive.`);
    let real: string;
    try {
      real = await fs.realpath(req.path);
    } catch {
      throw badRequest(`There is no folder ${req.path} on the server. Create or mount it first.`);
    }
    if (!(await isDirectory(real))) throw badRequest(`${req.path} is a file, not a folder. Give the folder that holds the recordings.`);
    try {
      await fs.access(real, fs.constants.R_OK | fs.constants.X_OK);
    } catch {
      throw badRequest(`The server process may not read ${real}. Give its user read and list permission, then add the root again.`);
    }
    const [dup] = await this.db.select().from(archiveRoots).where(eq(archiveRoots.path, real));
    if (dup) throw conflict(`${real} is already the archive root "${dup.name}".`);
    const [row] = await this.db.insert(archiveRoots).values({ name: req.name, path: real, notes: req.notes ?? '' }).returning();
    return { ...toRoot(row), recordingCount: 0, reachable: true };
  }

  async removeRoot(id: number): Promise<void> {
    const root = await this.root(id);
    const [{ n }] = await this.db.select({ n: count() }).from(recordings).where(eq(recordings.archiveRootId, id));
    if (n > 0) throw conflict(`Archive root "${root.name}" has ${n} registered recording${n === 1 ? '' : 's'}; delete them first (their files stay untouched).`);
    await this.db.delete(archiveRoots).where(eq(archiveRoots.id, id));
  }

  /** Lists one folder under a root: sub-folders, files with size and guessed format. */
  async browse(id: number, relative: string): Promise<ArchiveListing> {
    const root = await this.root(id);
    const { real, rootReal } = await resolveInsideRoot(root.path, relative);
    if (!(await isDirectory(real))) throw badRequest(`${relative} is a file; browse its folder instead.`);
    const dirents = await fs.readdir(real, { withFileTypes: true });
    const registered = new Map(
      (await this.db.select({ id: recordings.id, filePath: recordings.filePath }).from(recordings).where(eq(recordings.archiveRootId, id))).map((r) => [r.filePath, r.id]),
    );
    const entries: ArchiveEntry[] = [];
    for (const d of dirents) {
      const full = path.join(real, d.name);
      const rel = path.relative(rootReal, full);
      let target: string;
      try {
        target = await fs.realpath(full);
      } catch {
        entries.push({ name: d.name, path: rel, kind: 'file', sizeBytes: 0, format: null, refused: 'broken link' });
        continue;
      }
      if (!isInside(rootReal, target)) {
        entries.push({ name: d.name, path: rel, kind: 'file', sizeBytes: 0, format: null, refused: 'link leaves the archive root' });
        continue;
      }
      const st = await fs.stat(target);
      if (st.isDirectory()) entries.push({ name: d.name, path: rel, kind: 'folder', sizeBytes: 0, format: null });
      else if (st.isFile()) {
        entries.push({ name: d.name, path: rel, kind: 'file', sizeBytes: st.size, format: guessFormat(d.name), recordingId: registered.get(target) });
      }
    }
    entries.sort((a, b) => (a.kind === b.kind ? a.name.localeCompare(b.name) : a.kind === 'folder' ? -1 : 1));
    return { rootId: id, path: path.relative(rootReal, real), entries };
  }

  /**
   * Registers files in place: a list of paths, or a folder by pattern (optionally recursive).
   * Returns the new recordings and, per refused file, why. Side files (.sigmf-meta, raw .json)
   * are read now and stored with the recording.
   */
  async register(id: number, req: ArchiveRegisterRequest, user: SessionUser): Promise<ArchiveRegisterResult & { created: number[] }> {
    const root = await this.root(id);
    const refused: { path: string; reason: string }[] = [];
    const candidates: string[] = [];
    let rootReal = '';
    for (const p of req.paths ?? []) {
      try {
        const r = await resolveInsideRoot(root.path, p);
        rootReal = r.rootReal;
        if (await isDirectory(r.real)) refused.push({ path: p, reason: 'is a folder; register a folder with a pattern instead' });
        else candidates.push(r.real);
      } catch (err) {
        refused.push({ path: p, reason: err instanceof Error ? err.message : String(err) });
      }
    }
    if (req.folder !== undefined) {
      const r = await resolveInsideRoot(root.path, req.folder);
      rootReal = r.rootReal;
      if (!(await isDirectory(r.real))) throw badRequest(`${req.folder} is not a folder under the archive root.`);
      const re = patternToRegExp(req.pattern ?? '*');
      await walk(r.real, r.rootReal, req.recursive ?? false, re, candidates, refused);
    }
    if (!rootReal) rootReal = await fs.realpath(root.path);
    const unique = [...new Set(candidates)].filter((f) => !isSideFile(f));
    if (unique.length > MAX_REGISTER) {
      throw badRequest(`That selection holds ${unique.length} files; register at most ${MAX_REGISTER} at a time (narrow the pattern or pick a sub-folder).`);
    }
    const existing = new Map(
      unique.length
        ? (await this.db.select({ id: recordings.id, filePath: recordings.filePath }).from(recordings).where(inArray(recordings.filePath, unique))).map((r) => [r.filePath, r.id])
        : [],
    );
    const registered: { id: number; name: string; path: string }[] = [];
    for (const file of unique) {
      const rel = path.relative(rootReal, file);
      const already = existing.get(file);
      if (already !== undefined) {
        refused.push({ path: rel, reason: `already registered as recording ${already}` });
        continue;
      }
      try {
        const prepared = await prepareFile(file);
        const [row] = await this.db
          .insert(recordings)
          .values({
            name: path.basename(file),
            source: 'archive',
            filePath: file,
            sidecar: prepared.sidecar,
            sidecarPath: prepared.sidecarPath,
            declaredFormat: prepared.format,
            sizeBytes: prepared.sizeBytes,
            state: 'inspecting',
            archiveRootId: id,
            uploadedBy: user.id,
          })
          .returning({ id: recordings.id });
        registered.push({ id: row.id, name: path.basename(file), path: rel });
      } catch (err) {
        refused.push({ path: rel, reason: err instanceof Error ? err.message : String(err) });
      }
    }
    return { registered, refused, created: registered.map((r) => r.id) };
  }

  private async root(id: number): Promise<ArchiveRootRow> {
    const [row] = await this.db.select().from(archiveRoots).where(eq(archiveRoots.id, id));
    if (!row) throw notFound(`There is no archive root ${id}. Reload the list of archive folders.`);
    return row;
  }
}

function toRoot(r: ArchiveRootRow): Omit<ArchiveRoot, 'recordingCount' | 'reachable'> {
  return { id: r.id, name: r.name, path: r.path, notes: r.notes, createdAt: r.createdAt.toISOString() };
}

/** Format from the file name; WAV vs RF64 is settled by the header at inspection. */
export function guessFormat(name: string): RecordingFormat | null {
  const n = name.toLowerCase();
  if (n.endsWith('.wav') || n.endsWith('.bwf')) return 'wav';
  if (n.endsWith('.rf64') || n.endsWith('.bw64')) return 'rf64';
  if (n.endsWith('.sigmf-data') || n.endsWith('.sigmf-meta')) return 'sigmf';
  if (/\.(bin|raw|dat|pcm)$/.test(n)) return 'raw';
  return null;
}

function isSideFile(f: string): boolean {
  return /\.sigmf-meta$/i.test(f) || /\.json$/i.test(f);
}

/** Checks a file is readable and finds its side file; throws a one-line reason otherwise. */
async function prepareFile(file: string): Promise<{ format: RecordingFormat; sizeBytes: number; sidecar: string | null; sidecarPath: string | null }> {
  const format = guessFormat(file);
  if (!format) throw new Error('not a recording format Nullsmith reads (.wav, .rf64, .bw64, .sigmf-data, or .bin/.raw/.dat with a .json side file)');
  try {
    await fs.access(file, fs.constants.R_OK);
  } catch {
    throw new Error('the server process may not read this file; fix its permissions');
  }
  const st = await fs.stat(file);
  if (st.size === 0) throw new Error('the file is empty');
  let sidecarPath: string | null = null;
  if (format === 'sigmf') sidecarPath = file.replace(/\.sigmf-data$/i, '.sigmf-meta');
  if (format === 'raw') sidecarPath = await rawSideFile(file);
  let sidecar: string | null = null;
  if (sidecarPath) {
    try {
      sidecar = await fs.readFile(sidecarPath, 'utf8');
    } catch {
      throw new Error(`its side file ${path.basename(sidecarPath)} is missing or unreadable beside it`);
    }
  }
  const magic = await readMagic(file);
  return { format: format === 'wav' && (magic === 'RF64' || magic === 'BW64') ? 'rf64' : format, sizeBytes: st.size, sidecar, sidecarPath };
}

/**
 * The JSON side file of raw samples: `<data file>.json` (survey.raw.json, the documented
 * name), else the data file's stem with .json (survey.json).
 */
export async function rawSideFile(dataFile: string): Promise<string> {
  const candidates = [`${dataFile}.json`, dataFile.replace(/\.[^.]+$/, '.json')];
  for (const c of candidates) {
    try {
      await fs.access(c);
      return c;
    } catch {
      // try the next name
    }
  }
  return candidates[0];
}

async function readMagic(file: string): Promise<string> {
  const fh = await fs.open(file, 'r');
  try {
    const buf = Buffer.alloc(4);
    await fh.read(buf, 0, 4, 0);
    return buf.toString('latin1');
  } finally {
    await fh.close();
  }
}

async function walk(dir: string, rootReal: string, recursive: boolean, re: RegExp, out: string[], refused: { path: string; reason: string }[], seen = new Set<string>()): Promise<void> {
  if (seen.has(dir)) return; // a link loop inside the root
  seen.add(dir);
  let dirents;
  try {
    dirents = await fs.readdir(dir, { withFileTypes: true });
  } catch {
    refused.push({ path: path.relative(rootReal, dir), reason: 'folder cannot be read by the server process' });
    return;
  }
  for (const d of dirents) {
    if (out.length >= MAX_WALK) return;
    const full = path.join(dir, d.name);
    let real: string;
    try {
      real = await fs.realpath(full);
    } catch {
      refused.push({ path: path.relative(rootReal, full), reason: 'broken link' });
      continue;
    }
    if (!isInside(rootReal, real)) {
      if (re.test(d.name) || d.isSymbolicLink()) refused.push({ path: path.relative(rootReal, full), reason: `symbolic link to ${real}, outside the archive root` });
      continue;
    }
    const st = await fs.stat(real);
    if (st.isDirectory()) {
      if (recursive) await walk(real, rootReal, recursive, re, out, refused, seen);
    } else if (st.isFile() && re.test(d.name) && !isSideFile(real)) {
      out.push(real);
    }
  }
}

async function isDirectory(p: string): Promise<boolean> {
  try {
    return (await fs.stat(p)).isDirectory();
  } catch {
    return false;
  }
}
