import type { ChannelQc, RecordingFormat } from '../../shared/api/recordings.js';

/**
 * Contract of the compute task 'inspect' (worker/tasks/inspect.ts), kept on the server side so
 * the node never imports worker code. The child reads the whole file once: header validation,
 * whole-file sha256, per-channel QC. Progress is reported in bytes.
 */
export interface InspectPayload {
  recordingId: number;
  filePath: string;
  /** File name shown in messages. */
  name: string;
  declaredFormat: RecordingFormat;
  /** Side file text (SigMF meta, raw JSON side file) for multi-file formats. */
  sidecar: string | null;
  /** sha256 the uploader declared; a mismatch rejects the recording. */
  expectedSha256: string | null;
}

export interface InspectResult {
  /** Empty when the recording is fine; otherwise why it is rejected, one sentence each. */
  reasons: string[];
  sha256: string;
  sizeBytes: number;
  format?: RecordingFormat;
  datatype?: string;
  channels?: number;
  sampleRate?: number;
  sampleFrames?: number;
  durationS?: number;
  qc?: ChannelQc[];
  /** Header warnings (trailing bytes, extra chunks) that did not stop reading. */
  warnings: string[];
}
