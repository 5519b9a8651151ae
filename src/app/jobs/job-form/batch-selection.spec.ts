import { batchSelection, type RunOnValue } from './batch-selection';

const base: RunOnValue = { mode: 'list', recordingId: 4, extraRecordingIds: [], archiveRootId: null, archiveFolder: '', archivePattern: '*', archiveRecursive: false };

describe('batchSelection', () => {
  it('submits a single job when nothing else is picked', () => {
    expect(batchSelection(base)).toBeNull();
    expect(batchSelection({ ...base, extraRecordingIds: [4] })).toBeNull();
  });

  it('lists the chosen recording first, then the extra ones without repeating it', () => {
    expect(batchSelection({ ...base, extraRecordingIds: [9, 4, 7] })).toEqual({ recordingIds: [4, 9, 7] });
  });

  it('turns the folder fields into an archive selection, trimming slashes and defaulting the pattern', () => {
    expect(batchSelection({ ...base, mode: 'folder', archiveRootId: 2, archiveFolder: ' /leg-a/deep/ ', archivePattern: ' ', archiveRecursive: true })).toEqual({
      archive: { rootId: 2, folder: 'leg-a/deep', pattern: '*', recursive: true },
    });
    expect(batchSelection({ ...base, mode: 'folder' })).toBeNull();
  });
});
