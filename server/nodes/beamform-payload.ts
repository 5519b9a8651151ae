import path from 'node:path';
import { eq } from 'drizzle-orm';
import type { ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import type { RecordingRow } from '../db/schema/recordings.js';
import { recordings } from '../db/schema/recordings.js';
import type { BeamformTaskPayload, RecordingLocation } from '../../worker/tasks/beamform.js';
import { APP_VERSION } from '../version.js';
import { PermanentJobError, type JobPayloadResolver } from './job-payload.js';

/** Folder of a job's result files (run.json, windows.f32) under the results root. */
export const jobResultsDir = (resultsDir: string, jobId: number): string => path.join(resultsDir, String(jobId));

function location(r: RecordingRow): RecordingLocation {
  return { id: r.id, name: r.name, format: r.format ?? r.declaredFormat, filePath: r.filePath, sidecarText: r.sidecar, sidecarPath: r.sidecarPath };
}

/**
 * Builds a beamform job's compute payload from the database: where its recording(s) are, the
 * array geometry frozen at submission, and where to resume. A recording deleted or rejected
 * since submission fails the job at once (retrying cannot bring it back).
 */
export const resolveBeamformPayload: JobPayloadResolver = async (job, { db, resultsDir }) => {
  const load = async (id: number | null, what: string): Promise<RecordingRow> => {
    if (id === null) throw new PermanentJobError(`Job ${job.id} names no ${what}; rerun it with one.`);
    const [r] = await db.select().from(recordings).where(eq(recordings.id, id));
    if (!r) throw new PermanentJobError(`The ${what} (recording ${id}) of job ${job.id} no longer exists; rerun the job with another recording.`);
    if (r.state !== 'ready') throw new PermanentJobError(`The ${what} "${r.name}" (recording ${id}) is ${r.state}, not ready; rerun the job once it is.`);
    return r;
  };
  const recording = await load(job.recordingId, 'recording');
  const training = job.trainingRecordingId !== null ? await load(job.trainingRecordingId, 'training recording') : undefined;
  if (!job.arraySnapshot) throw new PermanentJobError(`Job ${job.id} has no array geometry stored; rerun it with an array.`);
  const payload: BeamformTaskPayload = {
    jobId: job.id,
    recording: location(recording),
    ...(training ? { trainingRecording: location(training) } : {}),
    array: job.arraySnapshot as ArrayGeometry,
    params: job.params,
    outDir: jobResultsDir(resultsDir, job.id),
    resumeFromWindow: job.checkpointWindow,
    meta: { jobName: job.name, softwareVersion: `Nullsmith ${APP_VERSION}`, attempt: job.attempts, recordingSha256: recording.sha256, ...(training ? { trainingRecordingSha256: training.sha256 } : {}) },
  };
  return payload;
};
