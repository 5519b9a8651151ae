import type { AppContext } from '../context.js';
import { ArrayService, type SeaWaterSpeed } from '../arrays/array-service.js';
import { seaWaterSpeed } from '../arrays/sea-water-speed.js';
import { loadUploadLimits, type UploadLimits } from '../uploads/upload-limits.js';
import { UploadService } from '../uploads/upload-service.js';
import { ArchiveService } from './archive-service.js';
import { Inspector } from './inspector.js';
import { RecordingService } from './recording-service.js';

/** The recordings family of services, built once per context (routers and the plugin share it). */
export interface RecordingKit {
  limits: UploadLimits;
  uploads: UploadService;
  recordings: RecordingService;
  arrays: ArrayService;
  archives: ArchiveService;
  inspector: Inspector;
}

declare module '../context.js' {
  interface AppServices {
    recordingKit?: RecordingKit;
    /** Tests may set limits before the app is built; otherwise they come from the environment. */
    uploadLimits?: UploadLimits;
  }
}

export function recordingKit(ctx: AppContext, speed: SeaWaterSpeed = seaWaterSpeed): RecordingKit {
  if (ctx.services.recordingKit) return ctx.services.recordingKit;
  const limits = ctx.services.uploadLimits ?? loadUploadLimits();
  const inspector = new Inspector(ctx);
  const kit: RecordingKit = {
    limits,
    inspector,
    uploads: new UploadService({ db: ctx.db, dataDir: ctx.config.dataDir, limits, onRecordingCreated: (id) => void inspector.enqueue(id) }),
    recordings: new RecordingService(ctx.db, ctx.config.dataDir),
    arrays: new ArrayService(ctx.db, speed),
    archives: new ArchiveService(ctx.db),
  };
  ctx.services.recordingKit = kit;
  return kit;
}
