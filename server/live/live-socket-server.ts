import type http from 'node:http';
import type { Duplex } from 'node:stream';
import { WebSocketServer } from 'ws';
import { LIVE_PATH } from '../../shared/api/live.js';
import { userFromUpgrade } from '../auth/auth-kit.js';
import type { AppContext } from '../context.js';
import type { LiveHub } from './live-hub.js';

/** Largest message a browser may send (subscriptions are tiny). */
const MAX_CLIENT_MESSAGE_BYTES = 16 * 1024;

function refuse(socket: Duplex, status: number, reason: string, message: string): void {
  const body = JSON.stringify({ error: { code: reason, message } });
  socket.end(
    `HTTP/1.1 ${status} ${status === 401 ? 'Unauthorized' : status === 403 ? 'Forbidden' : 'Bad Request'}\r\n` +
      'Content-Type: application/json; charset=utf-8\r\n' +
      `Content-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body}`,
  );
}

/**
 * Accepts WebSocket upgrades on LIVE_PATH only from a signed-in session (its cookie is checked
 * before the handshake; everything else is refused with an HTTP error and never upgraded),
 * and only from our own origin (a page elsewhere cannot ride a user's cookie). Other upgrade
 * paths are left for other handlers.
 */
export function attachLiveSockets(ctx: AppContext, server: http.Server, hub: LiveHub): WebSocketServer {
  const wss = new WebSocketServer({ noServer: true, maxPayload: MAX_CLIENT_MESSAGE_BYTES });
  server.on('upgrade', (req: http.IncomingMessage, socket: Duplex, head: Buffer) => {
    const url = new URL(req.url ?? '/', 'http://localhost');
    if (url.pathname !== LIVE_PATH) return;
    socket.on('error', () => socket.destroy());
    const origin = req.headers.origin;
    if (origin && new URL(origin).host !== req.headers.host) {
      return refuse(socket, 403, 'cross_origin', `Live updates are only served to pages of this server, not to ${origin}.`);
    }
    userFromUpgrade(ctx, req).then(
      (user) => {
        if (!user) return refuse(socket, 401, 'unauthorized', 'Sign in first: live updates need a signed-in session.');
        wss.handleUpgrade(req, socket, head, (ws) => hub.add(ws, user));
      },
      (err: unknown) => {
        ctx.logger.warn('live upgrade failed', { error: String(err) });
        refuse(socket, 400, 'upgrade_failed', 'The live channel could not read your session; reload the page.');
      },
    );
  });
  return wss;
}
