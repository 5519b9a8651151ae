import type { JobDto } from '../../shared/api/jobs.js';
import type { JobRow } from '../db/schema/jobs.js';

const iso = (d: Date | null): string | null => (d ? d.toISOString() : null);

/** The API view of a job row (dates as ISO strings, no internal columns). */
export function toJobDto(row: JobRow & { ownerName?: string }): JobDto {
  return {
    id: row.id,
    name: row.name,
    kind: row.kind,
    ownerId: row.ownerId,
    ...(row.ownerName !== undefined ? { ownerName: row.ownerName } : {}),
    state: row.state,
    priority: row.priority,
    params: row.params,
    paramsVersion: row.paramsVersion,
    arrayId: row.arrayId,
    recordingId: row.recordingId,
    trainingRecordingId: row.trainingRecordingId,
    runAfter: row.runAfter.toISOString(),
    attempts: row.attempts,
    maxAttempts: row.maxAttempts,
    claimedBy: row.claimedBy,
    leaseExpiresAt: iso(row.leaseExpiresAt),
    cancelRequested: row.cancelRequested,
    checkpointWindow: row.checkpointWindow,
    totalWindows: row.totalWindows,
    windowsDone: row.windowsDone,
    windowsPerSecond: row.windowsPerSecond,
    etaSeconds: row.etaSeconds,
    lastError: row.lastError,
    partial: row.partial,
    rerunOf: row.rerunOf,
    batchId: row.batchId,
    createdAt: row.createdAt.toISOString(),
    startedAt: iso(row.startedAt),
    finishedAt: iso(row.finishedAt),
    updatedAt: row.updatedAt.toISOString(),
  };
}
