import path from 'node:path';
import { and, asc, eq, inArray } from 'drizzle-orm';
import { MAX_BATCH_RECORDINGS, type SubmitBatchRequest } from '../../shared/api/job-batches.js';
import { formatParamsProblem, parseBeamformParams } from '../../shared/params/beamform-params.js';
import type { AppDb } from '../db/client.js';
import { archiveRoots } from '../db/schema/archive-roots.js';
import { recordings } from '../db/schema/recordings.js';
import { HttpError, notFound } from '../http/http-error.js';
import type { EnqueueInput } from '../queue/enqueue-job.js';
import { isInside, patternToRegExp, resolveInsideRoot } from '../recordings/archive-paths.js';
import { prepareBeamformJob, type JobEstimates } from './job-submission.js';

export interface BatchProblem {
  recordingId: number;
  recordingName: string | null;
  code: string;
  message: string;
  problems?: unknown;
}

/**
 * Ready recordings already registered under `folder` of an archive root whose file names match
 * `pattern` (directly in the folder, or anywhere below it when recursive). Only the database is
 * read, apart from resolving the folder itself (which refuses paths leaving the root).
 */
async function selectArchiveRecordings(db: AppDb, sel: NonNullable<SubmitBatchRequest['archive']>): Promise<number[]> {
  const [root] = await db.select().from(archiveRoots).where(eq(archiveRoots.id, sel.rootId));
  if (!root) throw notFound(`Archive root ${sel.rootId} does not exist; pick one from the Archives page.`);
  const { real: folder } = await resolveInsideRoot(root.path, sel.folder);
  const match = patternToRegExp(sel.pattern);
  const rows = await db
    .select({ id: recordings.id, filePath: recordings.filePath })
    .from(recordings)
    .where(and(eq(recordings.archiveRootId, root.id), eq(recordings.state, 'ready')))
    .orderBy(asc(recordings.filePath), asc(recordings.id));
  const ids = rows
    .filter((r) => isInside(folder, r.filePath) && (sel.recursive || path.dirname(r.filePath) === folder) && match.test(path.basename(r.filePath)))
    .map((r) => r.id);
  if (ids.length === 0) {
    throw new HttpError(404, 'batch_empty', `No ready recording registered under "${sel.folder || '/'}" of archive root "${root.name}" matches ${sel.pattern}${sel.recursive ? ' (sub-folders included)' : ' (sub-folders not included: set recursive to search them)'}. Register the files on the Archives page first, or widen the pattern.`);
  }
  return ids;
}

/**
 * Checks every recording of a batch with the same rules as a single submission. Any problem
 * refuses the whole batch (422 with one entry per failing recording), so nothing is half-queued.
 * Returns what to enqueue plus estimates summed over all jobs.
 */
export async function prepareBeamformBatch(
  db: AppDb,
  req: SubmitBatchRequest,
  ownerId: number,
): Promise<{ inputs: EnqueueInput[]; estimates: JobEstimates }> {
  // Parameter errors are the same for every recording: report them once, as a single submission does.
  const parsed = parseBeamformParams(req.params);
  if (!parsed.ok) {
    const problems = parsed.problems.map((p) => ({ path: ['params', ...p.path].join('.'), message: p.message }));
    throw new HttpError(400, 'invalid_job', `The job parameters are not valid: ${parsed.problems.map(formatParamsProblem).join('; ')}.`, { problems });
  }
  const ids = req.recordingIds ?? (await selectArchiveRecordings(db, req.archive!));
  if (ids.length > MAX_BATCH_RECORDINGS) {
    throw new HttpError(413, 'batch_too_large', `The selection holds ${ids.length} recordings; a batch holds at most ${MAX_BATCH_RECORDINGS}. Narrow the folder or pattern, or split it into several batches.`);
  }
  const dupes = [...new Set(ids.filter((id, i) => ids.indexOf(id) !== i))];
  if (dupes.length) {
    throw new HttpError(400, 'batch_duplicates', `Recording${dupes.length === 1 ? '' : 's'} ${dupes.join(', ')} appear${dupes.length === 1 ? 's' : ''} more than once in recordingIds; list each recording once.`);
  }
  const names = new Map((await db.select({ id: recordings.id, name: recordings.name }).from(recordings).where(inArray(recordings.id, ids))).map((r) => [r.id, r.name]));

  const inputs: EnqueueInput[] = [];
  const failures: BatchProblem[] = [];
  const estimates: JobEstimates = { windows: 0, runSeconds: 0, outputBytes: 0 };
  for (const recordingId of ids) {
    const recordingName = names.get(recordingId) ?? null;
    try {
      const p = await prepareBeamformJob(db, {
        name: `${req.name} · ${recordingName ?? `recording ${recordingId}`}`.slice(0, 200),
        ownerId,
        recordingId,
        ...(req.arrayId !== undefined ? { arrayId: req.arrayId } : {}),
        params: req.params,
        priority: req.priority,
        ...(req.runAfter ? { runAfter: req.runAfter } : {}),
        maxAttempts: req.maxAttempts,
      });
      inputs.push(p.input);
      estimates.windows += p.estimates.windows;
      estimates.runSeconds += p.estimates.runSeconds;
      estimates.outputBytes += p.estimates.outputBytes;
    } catch (e) {
      if (!(e instanceof HttpError)) throw e;
      const details = e.details as { problems?: unknown } | undefined;
      failures.push({ recordingId, recordingName, code: e.code, message: e.message, ...(details?.problems ? { problems: details.problems } : {}) });
    }
  }
  if (failures.length) {
    const list = failures.map((f) => `${f.recordingName ? `"${f.recordingName}"` : `recording ${f.recordingId}`}: ${f.message}`).join(' | ');
    throw new HttpError(
      422,
      'batch_refused',
      `Nothing was queued: ${failures.length} of ${ids.length} recording${ids.length === 1 ? '' : 's'} cannot run with these settings. Fix or remove them and submit again. ${list}`,
      { recordings: failures },
    );
  }
  return { inputs, estimates };
}
