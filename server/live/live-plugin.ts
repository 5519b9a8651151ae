import type { WebSocketServer } from 'ws';
import { LIVE_CLOSE } from '../../shared/api/live.js';
import type { ServerPlugin } from '../plugins.js';
import { ChangeFeed } from './change-feed.js';
import { LiveHub } from './live-hub.js';
import { attachLiveSockets } from './live-socket-server.js';

declare module '../context.js' {
  interface AppServices {
    /** The WebSocket fan-out (server/live). */
    live?: { hub: LiveHub; feed: ChangeFeed };
  }
}

/** Sockets are pinged (and users re-read) this often; a socket that missed a ping is cut. */
const SWEEP_MS = 20_000;

const sweepTimers = new WeakMap<object, NodeJS.Timeout>();
const servers = new WeakMap<object, WebSocketServer>();

/**
 * The live channel: change feed from the database (triggers + NOTIFY + poll) into the hub,
 * in-process queue events as an extra wake-up, and the WebSocket endpoint. List it after the
 * queue plugin so ctx.services.events exists.
 */
export const livePlugin: ServerPlugin = {
  name: 'live',
  async start(ctx) {
    const hub = new LiveHub(ctx);
    const feed = new ChangeFeed({
      db: ctx.db,
      dbKind: ctx.dbKind,
      onBatch: (b) => hub.onBatch(b),
      onError: (e) => ctx.logger.warn(`live change feed: ${e.message}`),
    });
    await feed.start();
    const wake = () => feed.wake();
    const events = ctx.services.events;
    if (events) for (const name of ['job:state', 'job:progress', 'node:heartbeat', 'queue:paused-changed'] as const) events.on(name, wake);
    ctx.services.live = { hub, feed };
    sweepTimers.set(ctx, setInterval(() => void hub.sweep().catch(() => undefined), SWEEP_MS));
  },
  attach(ctx, server) {
    const live = ctx.services.live;
    if (!live) return;
    servers.set(ctx, attachLiveSockets(ctx, server, live.hub));
    // Upgraded sockets still count as connections of the HTTP server, so its graceful close
    // (main.ts drains before stopping plugins) would wait for them forever: say goodbye to
    // every socket as soon as the server starts closing.
    const close = server.close.bind(server);
    server.close = ((cb?: (err?: Error) => void) => {
      live.hub.closeAll(LIVE_CLOSE.shuttingDown, 'The server is restarting; reconnecting shortly.');
      return close(cb);
    }) as typeof server.close;
  },
  async stop(ctx) {
    clearInterval(sweepTimers.get(ctx));
    const live = ctx.services.live;
    if (!live) return;
    live.hub.closeAll(LIVE_CLOSE.shuttingDown, 'The server is restarting; reconnecting shortly.');
    servers.get(ctx)?.close();
    await live.feed.stop();
  },
};
