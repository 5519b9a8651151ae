import type { SubmitBatchRequest } from '../../../../shared/api/job-batches.js';

/** What the "Run on" part of the job form holds. */
export interface RunOnValue {
  /** 'list': the chosen recording plus any picked under "Also run on"; 'folder': an archive folder. */
  mode: 'list' | 'folder';
  recordingId: number | null;
  extraRecordingIds: number[];
  archiveRootId: number | null;
  archiveFolder: string;
  archivePattern: string;
  archiveRecursive: boolean;
}

/**
 * The recordings part of a submission: `null` for a single job on the chosen recording, else
 * the batch selection POST /api/jobs/batch takes (a list of ids, or an archive folder, whose
 * recordings the server checks one by one; the chosen recording then only serves the form's own
 * checks and the advisor as an example of what the folder holds).
 */
export function batchSelection(v: RunOnValue): Pick<SubmitBatchRequest, 'recordingIds' | 'archive'> | null {
  if (v.mode === 'folder') {
    if (v.archiveRootId === null) return null;
    return {
      archive: {
        rootId: v.archiveRootId,
        folder: v.archiveFolder.trim().replace(/^\/+|\/+$/g, ''),
        pattern: v.archivePattern.trim() || '*',
        recursive: v.archiveRecursive,
      },
    };
  }
  const extras = v.extraRecordingIds.filter((id) => id !== v.recordingId);
  if (!extras.length || v.recordingId === null) return null;
  return { recordingIds: [v.recordingId, ...extras] };
}
