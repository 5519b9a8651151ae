import crypto from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { CSRF_COOKIE, CSRF_HEADER } from '../../shared/api/auth.js';
import { HttpError } from '../http/http-error.js';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Double-submit CSRF protection. Every response that lacks the token cookie gets a fresh
 * random one (readable by scripts, SameSite=Lax); a state-changing request must echo it in
 * the X-XSRF-TOKEN header. Another site can make the browser send our cookies but cannot
 * read them, so it cannot forge the header. Angular's HttpClient echoes it by itself.
 * Requests with a Bearer token carry no ambient cookie authority and are exempt.
 */
export function csrfProtection(cookieSecure: boolean | 'auto'): RequestHandler {
  return (req, res, next) => {
    const cookieToken = readCookie(req);
    if (!cookieToken) {
      res.cookie(CSRF_COOKIE, crypto.randomBytes(32).toString('base64url'), {
        httpOnly: false,
        sameSite: 'lax',
        secure: cookieSecure === 'auto' ? req.secure : cookieSecure,
        path: '/',
      });
    }
    if (SAFE_METHODS.has(req.method) || /^Bearer\s/i.test(req.get('authorization') ?? '')) return next();
    const headerToken = req.get(CSRF_HEADER);
    if (!cookieToken || !headerToken || !same(cookieToken, headerToken)) {
      return next(
        new HttpError(
          403,
          'csrf',
          `This request is missing its anti-forgery token. Reload the page and try again; scripts must first GET any page, then send the ${CSRF_COOKIE} cookie's value in the ${CSRF_HEADER} header (or use an API token).`,
        ),
      );
    }
    next();
  };
}

function readCookie(req: Request): string | undefined {
  const value: unknown = req.cookies?.[CSRF_COOKIE];
  return typeof value === 'string' && value.length >= 16 ? value : undefined;
}

function same(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && crypto.timingSafeEqual(x, y);
}
