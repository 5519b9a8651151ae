import type { ServerPlugin } from '../plugins.js';
import { seedDemoRecordings } from '../demo/seed-demo-recordings.js';
import { recordingKit } from './recording-kit.js';

/**
 * Start-up and shutdown of the recordings family: finishes file moves a crash interrupted,
 * seeds the demo array and recordings on an empty database (DEMO_DATA=on), and once every
 * plugin has started (so the compute pool exists) re-inspects recordings left 'inspecting'.
 * List it after the compute plugin.
 */
export const recordingsPlugin: ServerPlugin = {
  name: 'recordings',
  async start(ctx) {
    const kit = recordingKit(ctx);
    const moved = await kit.uploads.finishInterruptedMoves();
    if (moved) ctx.logger.info(`finished moving ${moved} completed upload(s) into place`);
    if (ctx.config.demoData) await seedDemoRecordings(ctx);
  },
  async attach(ctx) {
    await recordingKit(ctx).inspector.resumeAll();
  },
  stop(ctx) {
    ctx.services.recordingKit?.inspector.stop();
  },
};
