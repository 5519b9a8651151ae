import fs from 'node:fs/promises';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { estimateOutputBytes, estimateRunSeconds, countWindows } from '../../shared/advisor/job-estimates.js';
import { arrayGeometrySchema, type ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import { parseRawSidecar } from '../../shared/formats/raw-sidecar.js';
import { parseSigmfMeta } from '../../shared/formats/sigmf-meta.js';
import { MAX_SIDECAR_CHARS } from '../../shared/formats/limits.js';
import { BEAMFORM_PARAMS_VERSION, formatParamsProblem, parseBeamformParams, type BeamformParams } from '../../shared/params/beamform-params.js';
import { expandBeamFan, selectBins } from '../../shared/params/job-layout.js';
import type { RecordingInfo } from '../../shared/params/validate-against-recording.js';
import { validateParamsAgainstRecording } from '../../shared/params/validate-against-recording.js';
import type { AppDb } from '../db/client.js';
import { arrays } from '../db/schema/arrays.js';
import { recordings, type RecordingRow } from '../db/schema/recordings.js';
import { HttpError } from '../http/http-error.js';
import type { EnqueueInput } from '../queue/enqueue-job.js';

export interface JobEstimates {
  windows: number;
  runSeconds: number;
  outputBytes: number;
}

const invalid = (message: string, problems: { path: string; message: string }[]) =>
  new HttpError(400, 'invalid_job', message, { problems });

async function loadReadyRecording(db: AppDb, id: number, what: string): Promise<RecordingRow> {
  const [r] = await db.select().from(recordings).where(eq(recordings.id, id));
  if (!r) throw new HttpError(404, 'recording_not_found', `The ${what} (recording ${id}) does not exist; pick one from the Recordings list.`);
  if (r.state !== 'ready') {
    throw new HttpError(409, 'recording_not_ready', `The ${what} "${r.name}" is ${r.state}; only ready recordings can be beamformed` + (r.state === 'inspecting' ? ' (wait for its inspection to finish).' : ` (${r.rejectReasons.join('; ') || 'see its page'}).`));
  }
  return r;
}

/** The facts parameter checks need, from the inspected row and, for baseband formats, the side file (pure parsers). */
async function recordingInfo(r: RecordingRow): Promise<RecordingInfo> {
  let complex = false;
  let centerFrequencyHz = 0;
  const format = r.format ?? r.declaredFormat;
  if (format === 'sigmf' || format === 'raw') {
    const text = r.sidecar ?? (r.sidecarPath ? (await fs.readFile(r.sidecarPath, 'utf8')).slice(0, MAX_SIDECAR_CHARS) : null);
    if (text) {
      const d = format === 'sigmf' ? parseSigmfMeta(text, r.sizeBytes, path.basename(r.filePath)) : parseRawSidecar(text, r.sizeBytes, path.basename(r.filePath));
      complex = d.complex;
      centerFrequencyHz = d.centerFrequencyHz;
    }
  }
  return { sampleRate: r.sampleRate ?? 0, totalFrames: r.sampleFrames ?? 0, complex, centerFrequencyHz, channels: r.channels };
}

/**
 * Checks a job request against its recording(s) and array and returns what to enqueue plus the
 * advisor's estimates. Every problem is listed with its field path (400); a missing or unready
 * recording is 404/409. Nothing is stored here.
 */
export async function prepareBeamformJob(
  db: AppDb,
  req: { name: string; ownerId: number; recordingId: number; arrayId?: number; trainingRecordingId?: number; params: unknown; priority: number; runAfter?: string; maxAttempts: number; rerunOf?: number },
  frozenArray?: { arrayId: number | null; geometry: ArrayGeometry },
): Promise<{ input: EnqueueInput; estimates: JobEstimates }> {
  const parsed = parseBeamformParams(req.params);
  if (!parsed.ok) {
    const problems = parsed.problems.map((p) => ({ path: ['params', ...p.path].join('.'), message: p.message }));
    throw invalid(`The job parameters are not valid: ${parsed.problems.map(formatParamsProblem).join('; ')}.`, problems);
  }
  const params: BeamformParams = parsed.params;
  const recording = await loadReadyRecording(db, req.recordingId, 'recording');

  let arrayId: number | null;
  let geometry: ArrayGeometry;
  if (frozenArray && req.arrayId === undefined) {
    ({ arrayId, geometry } = frozenArray);
  } else {
    const id = req.arrayId ?? recording.arrayId;
    if (id === null || id === undefined) {
      throw new HttpError(400, 'array_required', `Recording "${recording.name}" is not linked to an array; link one on its page or pass arrayId.`);
    }
    const [a] = await db.select().from(arrays).where(eq(arrays.id, id));
    if (!a) throw new HttpError(404, 'array_not_found', `Array ${id} does not exist; pick one from the Arrays catalogue.`);
    arrayId = a.id;
    geometry = arrayGeometrySchema.parse(a.geometry);
  }

  const wantsTrainingRecording = params.beamformer.kind === 'mvdr' && params.beamformer.training.source === 'recording';
  if (wantsTrainingRecording && req.trainingRecordingId === undefined) {
    throw invalid('MVDR is set to train on a separate noise-only recording: pass its id as trainingRecordingId.', [
      { path: 'trainingRecordingId', message: 'required when beamformer.training.source is "recording"' },
    ]);
  }
  const training = wantsTrainingRecording ? await loadReadyRecording(db, req.trainingRecordingId!, 'training recording') : undefined;

  const info = await recordingInfo(recording);
  const problems = validateParamsAgainstRecording(params, info, geometry, training ? await recordingInfo(training) : undefined);
  if (problems.length) {
    throw invalid(
      `This job cannot run on recording "${recording.name}" with this array: ${problems.map(formatParamsProblem).join('; ')}.`,
      problems.map((p) => ({ path: p.path.join('.'), message: p.message })),
    );
  }

  const bins = selectBins(params, info).bins.length;
  const beams = expandBeamFan(params.beams).azimuthsDeg.length;
  const size = {
    totalFrames: info.totalFrames,
    channels: geometry.elements.filter((e) => !e.excluded).length,
    nfft: params.nfft,
    hop: params.hop,
    snapshotsPerWindow: params.snapshotsPerWindow,
    windowHop: params.windowHop,
    bins,
    beams,
    savedBeams: params.savedBeams.length,
  };
  const estimates: JobEstimates = { windows: countWindows(size).windows, runSeconds: estimateRunSeconds(size), outputBytes: estimateOutputBytes(size) };
  return {
    input: {
      name: req.name,
      kind: 'beamform',
      ownerId: req.ownerId,
      params,
      paramsVersion: BEAMFORM_PARAMS_VERSION,
      recordingId: recording.id,
      trainingRecordingId: training?.id ?? null,
      arrayId,
      arraySnapshot: geometry,
      priority: req.priority,
      maxAttempts: req.maxAttempts,
      totalWindows: estimates.windows,
      rerunOf: req.rerunOf ?? null,
      ...(req.runAfter ? { runAfter: new Date(req.runAfter) } : {}),
    },
    estimates,
  };
}
