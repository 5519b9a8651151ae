import type { RequestHandler } from 'express';
import type { TokenScope } from '../../shared/api/tokens.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';
import { authenticateToken } from './token-service.js';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set when the request authenticated with a personal API token instead of a session. */
      apiToken?: { id: number; scope: TokenScope };
    }
  }
}

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Account and administration endpoints that a token may read but never change: a leaked
 * script token must not be able to mint more tokens, change roles or settings.
 */
const SESSION_ONLY_WRITES = ['/api/tokens', '/api/users', '/api/settings', '/api/retention', '/api/profile', '/api/auth', '/api/outbox'];

/**
 * `Authorization: Bearer nsk_…` on /api: authenticates the token, sets req.user and
 * req.apiToken, and enforces its scope (read: GET/HEAD only; submit: also uploads, jobs and
 * other non-account changes). A bad token is a 401 saying why; a session cookie sent along is
 * ignored, so a script never acts with a browser's authority. CSRF does not apply
 * (server/auth/csrf.ts exempts Bearer requests).
 */
export function bearerAuth(ctx: AppContext): RequestHandler {
  return (req, _res, next) => {
    const header = req.get('authorization');
    if (!header) return next();
    const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
    if (!m) {
      return next(new HttpError(401, 'invalid_token', 'The Authorization header must be "Bearer <token>" with one API token and nothing else.'));
    }
    authenticateToken(ctx.db, m[1]).then(
      ({ user, tokenId, scope }) => {
        const method = req.method.toUpperCase();
        const path = req.originalUrl.split('?')[0];
        if (!SAFE.has(method)) {
          if (scope === 'read') {
            return next(new HttpError(403, 'token_scope', `This API token has the "read" scope, which may only look (GET). Create a token with the "submit" scope to ${method} ${path}.`));
          }
          if (SESSION_ONLY_WRITES.some((p) => path === p || path.startsWith(`${p}/`))) {
            return next(new HttpError(403, 'token_scope', `API tokens cannot change accounts, tokens or settings (${method} ${path}). Sign in to Nullsmith in a browser to do that.`));
          }
        }
        req.user = user;
        req.apiToken = { id: tokenId, scope };
        next();
      },
      (err: unknown) => next(err),
    );
  };
}
