import { basename } from 'node:path';
import { stat } from 'node:fs/promises';
import { RecordingFormatError } from '../../shared/formats/recording-format-error.js';
import type { InspectPayload, InspectResult } from '../../server/recordings/inspect-task.types.js';
import { readRecordingDescription } from '../io/read-recording-description.js';
import { scanRecording } from '../io/scan-recording.js';
import { PermanentTaskError, TaskAbortedError, type ComputeTask } from './compute-task.js';

/**
 * Recording inspection in a compute child: full header validation, then one pass over every
 * byte for the whole-file sha256 (and the SigMF core:sha512 check when the metadata has one) and per-channel QC (RMS, peak, clipping, DC, dead and flat
 * flags). A bad file is not an error of the task: it comes back as reasons, so the recording
 * becomes 'rejected' with words a person can act on. Progress is in bytes.
 */
export const inspectTask: ComputeTask<InspectPayload, InspectResult> = {
  kind: 'inspect',
  async run(p, { signal, progress }) {
    let sizeBytes: number;
    try {
      sizeBytes = (await stat(p.filePath)).size;
    } catch (e) {
      throw new PermanentTaskError(`Cannot read ${p.name} on the server (${(e as NodeJS.ErrnoException).code ?? String(e)}).`);
    }
    const reasons: string[] = [];
    let description;
    try {
      description = await readRecordingDescription(p.declaredFormat, p.filePath, p.sidecar === null ? undefined : { text: p.sidecar });
    } catch (e) {
      if (!(e instanceof RecordingFormatError)) throw e;
      reasons.push(e.message);
    }
    if (!description) {
      // The header is unusable, but the uploader still gets the whole-file hash check.
      return { reasons, sha256: '', sizeBytes, warnings: [] };
    }
    progress(0, sizeBytes);
    let scan;
    try {
      scan = await scanRecording(p.filePath, description, {
        signal,
        onProgress: (fraction) => progress(Math.round(fraction * sizeBytes), sizeBytes),
      });
    } catch (e) {
      if (signal.aborted) throw new TaskAbortedError();
      if (!(e instanceof RecordingFormatError)) throw e;
      return { reasons: [e.message], sha256: '', sizeBytes, warnings: description.warnings };
    }
    if (description.sha512 && scan.sha512 !== description.sha512) {
      reasons.push(
        `${basename(p.filePath)} hashes to sha512 ${scan.sha512}, not the core:sha512 ${description.sha512} its SigMF metadata declares: ` +
          'the data file was damaged, changed after the metadata was written, or belongs to other metadata. Copy or upload the matching .sigmf-data and .sigmf-meta again.',
      );
    }
    if (p.expectedSha256 && p.expectedSha256 !== scan.sha256) {
      reasons.push(`The whole file hashes to sha256 ${scan.sha256}, not the ${p.expectedSha256} declared when it was uploaded: the file was damaged or changed on the way. Upload it again.`);
    }
    return {
      reasons,
      sha256: scan.sha256,
      sizeBytes: scan.fileBytes,
      format: description.format,
      datatype: description.datatype,
      channels: description.channels,
      sampleRate: description.sampleRate,
      sampleFrames: description.frames,
      durationS: description.frames / description.sampleRate,
      qc: scan.qc,
      warnings: description.warnings.map((w) => `${basename(p.filePath)}: ${w}`),
    };
  },
};
