import type http from 'node:http';
import type { AppContext } from './context.js';
import { demoJobPlugin } from './demo/demo-job-plugin.js';
import { livePlugin } from './live/live-plugin.js';
import { adminPlugin } from './admin/admin-plugin.js';
import { mailPlugin } from './mail/mail-plugin.js';
import { computePlugin } from './nodes/compute-plugin.js';
import { queuePlugin } from './nodes/queue-plugin.js';
import { recordingsPlugin } from './recordings/recordings-plugin.js';

/**
 * A part of the server with a life cycle (compute pool, job node, live channel, mailer).
 * main.ts runs every plugin in list order: start() after the database opens and before the
 * Express app is built (so routers find ctx.compute / ctx.services), attach() once the HTTP
 * server exists but before it listens (WebSocket upgrades), and stop() in reverse order at
 * shutdown, before the database closes.
 */
export interface ServerPlugin {
  name: string;
  start?(ctx: AppContext): Promise<void> | void;
  attach?(ctx: AppContext, server: http.Server): Promise<void> | void;
  stop?(ctx: AppContext): Promise<void> | void;
}

/** Add one line per plugin (keep the import sorted with the others). */
export const serverPlugins: ServerPlugin[] = [computePlugin, queuePlugin, recordingsPlugin, mailPlugin, adminPlugin, livePlugin, demoJobPlugin];
