import path from 'node:path';

/** Where upload sessions keep their partial files: DATA_DIR/uploads/<session id>.part. */
export const uploadPartPath = (dataDir: string, uploadId: string): string => path.join(dataDir, 'uploads', `${uploadId}.part`);

/** Folder of one uploaded or demo recording: DATA_DIR/recordings/<id>/ (keeps the original file name). */
export const recordingDir = (dataDir: string, recordingId: number): string => path.join(dataDir, 'recordings', String(recordingId));

/** A file name safe on every file system we write to: no folders, no control or reserved characters. */
export function safeFileName(name: string): string {
  const base = path.basename(name.replace(/\\/g, '/'));
  const cleaned = base.replace(/[\u0000-\u001f<>:"/\\|?*]/g, '_').replace(/^\.+/, '_').slice(0, 200);
  return cleaned || 'recording';
}
