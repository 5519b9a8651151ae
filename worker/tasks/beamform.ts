import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import type { RecordingDescription } from '../../shared/formats/recording-description.js';
import type { ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import { formatParamsProblem, parseBeamformParams } from '../../shared/params/beamform-params.js';
import { ChannelMapError, frameSourceOptionsFromArray, openFrameSource, readRecordingDescription, type OpenedFrameSource } from '../io/index.js';
import { JobSetupError, runBeamformJob } from '../runner/run-beamform-job.js';
import { PermanentTaskError, TaskAbortedError, type ComputeTask } from './compute-task.js';

/** Where a recording's samples are, as the node found it in the database. */
export interface RecordingLocation {
  id: number;
  name: string;
  format: RecordingDescription['format'];
  filePath: string;
  sidecarText?: string | null;
  sidecarPath?: string | null;
}

export interface BeamformTaskPayload {
  jobId: number;
  recording: RecordingLocation;
  trainingRecording?: RecordingLocation;
  /** The array geometry frozen at submission. */
  array: ArrayGeometry;
  params: unknown;
  outDir: string;
  /** Windows [0, resumeFromWindow) are already stored and checkpointed. */
  resumeFromWindow: number;
  meta?: Record<string, unknown>;
}

export interface BeamformTaskResult {
  status: 'completed';
  totalWindows: number;
  windowsDone: number;
  windowsComputed: number;
  recordingSecondsProcessed: number;
  wallMs: number;
}

/** Write errors that mean the results volume, not the job, is at fault (found by the disk-full fault test). */
const WRITE_FAILURES: Record<string, string> = {
  ENOSPC: 'the disk is full',
  EDQUOT: 'the disk quota is used up',
  EFBIG: 'the file grew beyond the size this file system or process allows',
  EROFS: 'the results volume is mounted read-only',
};

/** Progress messages at most this often (the node stores them once a second); checkpoints always go at once. */
const PROGRESS_EVERY_MS = 100;

async function open(loc: RecordingLocation, array: ArrayGeometry): Promise<OpenedFrameSource> {
  try {
    const sidecar = loc.sidecarText ? { text: loc.sidecarText } : loc.sidecarPath ? { path: loc.sidecarPath } : undefined;
    const description = await readRecordingDescription(loc.format, loc.filePath, sidecar);
    return await openFrameSource(loc.filePath, description, frameSourceOptionsFromArray(array));
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    if (e instanceof RecordingFormatError || e instanceof ChannelMapError) {
      throw new PermanentTaskError(`Recording ${loc.id} "${loc.name}" cannot be read: ${err.message}`, { cause: e });
    }
    if (err.code === 'ENOENT' || err.code === 'EACCES') {
      throw new PermanentTaskError(`Recording ${loc.id} "${loc.name}": its file ${loc.filePath} is missing or unreadable (${err.code}); restore the file or re-register the recording.`, { cause: e });
    }
    throw e; // I/O hiccups are transient: the job is retried
  }
}

/**
 * JOB_CHECKPOINT_SECONDS from the environment this child inherited from its node (validated
 * there at start, server/nodes/node-timing.ts); 1 s when unset.
 */
function checkpointIntervalMs(): number {
  const s = Number(process.env['JOB_CHECKPOINT_SECONDS']);
  return Number.isFinite(s) && s >= 0.05 ? s * 1000 : 1000;
}

/**
 * One beamform job attempt in a compute child: opens the recording(s) with the frozen array's
 * channel map, runs the job runner from the checkpoint, reports windows done and each fsynced
 * checkpoint (the node commits only those), and stops between windows when cancelled.
 */
export const beamformTask: ComputeTask<BeamformTaskPayload, BeamformTaskResult> = {
  kind: 'beamform',
  async run(payload, { signal, progress }) {
    const parsed = parseBeamformParams(payload.params);
    if (!parsed.ok) {
      throw new PermanentTaskError(`Job ${payload.jobId} has invalid parameters: ${parsed.problems.map(formatParamsProblem).join('; ')}. Rerun it with corrected parameters.`);
    }
    const source = await open(payload.recording, payload.array);
    const trainingSource = payload.trainingRecording ? await open(payload.trainingRecording, payload.array).catch(async (e: unknown) => {
      await source.close();
      throw e;
    }) : undefined;
    let total = 0;
    let done = payload.resumeFromWindow;
    let checkpoint = payload.resumeFromWindow;
    let lastSent = 0;
    try {
      const r = await runBeamformJob({
        source,
        ...(trainingSource ? { trainingSource } : {}),
        params: parsed.params,
        array: payload.array,
        outDir: payload.outDir,
        resumeFromWindow: payload.resumeFromWindow,
        checkpointIntervalMs: checkpointIntervalMs(),
        signal,
        meta: { jobId: payload.jobId, ...payload.meta },
        onWindowDone: (j, totalWindows, summary) => {
          total = totalWindows;
          done = j + 1;
          const now = Date.now();
          if (now - lastSent >= PROGRESS_EVERY_MS || done === totalWindows) {
            lastSent = now;
            progress(done, total, { checkpointWindow: checkpoint, summary });
          }
        },
        onCheckpoint: (lastWindow) => {
          checkpoint = lastWindow + 1;
          progress(done, total, { checkpointWindow: checkpoint });
        },
      });
      progress(r.windowsDone, r.totalWindows, { checkpointWindow: r.windowsDone });
      if (r.status === 'aborted') throw new TaskAbortedError(`Job ${payload.jobId} stopped on request after ${r.windowsDone} of ${r.totalWindows} windows; those windows are kept.`);
      return {
        status: 'completed',
        totalWindows: r.totalWindows,
        windowsDone: r.windowsDone,
        windowsComputed: r.windowsComputed,
        recordingSecondsProcessed: r.recordingSecondsProcessed,
        wallMs: r.wallMs,
      };
    } catch (e) {
      if (e instanceof JobSetupError) {
        throw new PermanentTaskError(`Job ${payload.jobId} cannot run on this recording: ${e.message.replace(/^the job cannot run: /, '')}. Rerun it with corrected parameters.`, { cause: e });
      }
      const code = (e as NodeJS.ErrnoException).code;
      if (code && code in WRITE_FAILURES) {
        // Transient: the attempt is retried (space may be freed meanwhile); the reason must say what to do.
        throw new Error(
          `Job ${payload.jobId} could not write its results to ${payload.outDir}: ${WRITE_FAILURES[code]} (${code}). ` +
            `Free space on the results volume (RESULTS_DIR) or ask operations to, then rerun the job; the ${checkpoint} windows already stored are kept.`,
          { cause: e },
        );
      }
      throw e;
    } finally {
      await source.close();
      await trainingSource?.close();
    }
  },
};
