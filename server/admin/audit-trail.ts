import type { Request, RequestHandler } from 'express';
import { normalizeEmail } from '../auth/users.js';
import type { AppContext } from '../context.js';
import { audit } from '../db/schema/index.js';
import { actorLabel } from '../queue/actor.js';

/** What one audited HTTP action records. */
interface AuditRule {
  method: string;
  /** Matched against the path without query string. */
  path: RegExp;
  action: string;
  /** Which outcomes count: success (2xx/3xx) by default. */
  when?: (status: number) => boolean;
  target: (m: RegExpExecArray, req: Request, body: unknown) => string;
  detail?: (req: Request, body: unknown, status: number) => unknown;
}

const ok = (s: number) => s < 400;
const idOf = (body: unknown): string => {
  const b = body as Record<string, { id?: unknown } | undefined> & { id?: unknown } | undefined;
  const id = b?.id ?? b?.job?.id ?? b?.recording?.id ?? b?.upload?.id ?? b?.array?.id ?? b?.root?.id;
  return id === undefined ? '?' : String(id);
};

/**
 * Actions other parts of the server carry out that the audit log must show. Queue operations
 * (cancel, priority, pause, drain) write their own entries inside their transactions, and the
 * admin services (users, settings, tokens, retention) write theirs with before/after values;
 * everything else is recorded here from the finished HTTP exchange, so routers stay free of
 * audit code. A request that failed changed nothing and is not recorded, except sign-ins.
 */
const RULES: AuditRule[] = [
  {
    method: 'POST',
    path: /^\/api\/auth\/login$/,
    action: 'auth.sign-in',
    target: (_m, req) => `user:${req.user?.id ?? '?'}`,
  },
  {
    method: 'POST',
    path: /^\/api\/auth\/login$/,
    action: 'auth.sign-in-failed',
    when: (s) => s === 401 || s === 403 || s === 429,
    target: (_m, req) => `account:${typeof req.body?.email === 'string' ? normalizeEmail(req.body.email).slice(0, 200) : '?'}`,
    detail: (req, _b, status) => ({ status, address: req.ip ?? null, reason: status === 429 ? 'throttled' : status === 403 ? 'account disabled' : 'wrong e-mail or password' }),
  },
  { method: 'POST', path: /^\/api\/auth\/logout$/, action: 'auth.sign-out', target: (_m, req) => `user:${req.user?.id ?? '?'}` },
  { method: 'POST', path: /^\/api\/uploads$/, action: 'upload.open', target: (_m, _r, b) => `upload:${idOf(b)}`, detail: (req) => ({ name: req.body?.name, sizeBytes: req.body?.sizeBytes }) },
  { method: 'POST', path: /^\/api\/uploads\/([^/]+)\/complete$/, action: 'upload.complete', target: (m) => `upload:${m[1]}`, detail: (_r, b) => ({ recordingId: (b as { recordingId?: unknown })?.recordingId ?? idOf(b) }) },
  { method: 'DELETE', path: /^\/api\/uploads\/([^/]+)$/, action: 'upload.cancel', target: (m) => `upload:${m[1]}` },
  {
    method: 'POST',
    path: /^\/api\/archives\/(\d+)\/register$/,
    action: 'recording.register',
    target: (m) => `archive:${m[1]}`,
    detail: (_r, b) => ({ registered: ((b as { registered?: { id: number; path: string }[] })?.registered ?? []).map((r) => ({ id: r.id, path: r.path })) }),
  },
  { method: 'POST', path: /^\/api\/archives$/, action: 'archive.add', target: (_m, _r, b) => `archive:${idOf(b)}`, detail: (req) => ({ name: req.body?.name, path: req.body?.path }) },
  { method: 'DELETE', path: /^\/api\/archives\/(\d+)$/, action: 'archive.remove', target: (m) => `archive:${m[1]}` },
  { method: 'POST', path: /^\/api\/arrays$/, action: 'array.create', target: (_m, _r, b) => `array:${idOf(b)}`, detail: (req) => ({ name: req.body?.name }) },
  { method: 'PUT', path: /^\/api\/arrays\/(\d+)$/, action: 'array.update', target: (m) => `array:${m[1]}` },
  { method: 'DELETE', path: /^\/api\/arrays\/(\d+)$/, action: 'array.delete', target: (m) => `array:${m[1]}` },
  { method: 'PATCH', path: /^\/api\/recordings\/(\d+)$/, action: 'recording.update', target: (m) => `recording:${m[1]}`, detail: (req) => ({ fields: Object.keys(req.body ?? {}) }) },
  { method: 'DELETE', path: /^\/api\/recordings\/(\d+)$/, action: 'recording.delete', target: (m) => `recording:${m[1]}` },
  {
    method: 'POST',
    path: /^\/api\/jobs$/,
    action: 'job.submit',
    target: (_m, _r, b) => `job:${idOf(b)}`,
    detail: (req) => ({ name: req.body?.name, recordingId: req.body?.recordingId, priority: req.body?.priority ?? 0 }),
  },
  { method: 'POST', path: /^\/api\/jobs\/(\d+)\/rerun$/, action: 'job.submit', target: (_m, _r, b) => `job:${idOf(b)}`, detail: (req) => ({ rerunOf: Number(/\/jobs\/(\d+)/.exec(req.originalUrl)?.[1]) }) },
  { method: 'DELETE', path: /^\/api\/jobs\/(\d+)$/, action: 'job.delete', target: (m) => `job:${m[1]}` },
];

/** The rules, for tests and the README's list of audited actions. */
export const AUDITED_HTTP_ACTIONS = [...new Set(RULES.map((r) => r.action))];

/**
 * Mount on /api before the routers. Remembers the JSON body each response sends (for the id
 * of something just created) and writes the audit entry once the response has finished.
 */
export function auditTrail(ctx: AppContext): RequestHandler {
  return (req, res, next) => {
    const method = req.method.toUpperCase();
    if (method === 'GET' || method === 'HEAD' || method === 'OPTIONS') return next();
    const path = req.originalUrl.split('?')[0];
    const candidates = RULES.filter((r) => r.method === method && r.path.test(path));
    if (!candidates.length) return next();
    let body: unknown;
    const json = res.json.bind(res);
    res.json = (b: unknown) => {
      body = b;
      return json(b);
    };
    res.on('finish', () => {
      for (const rule of candidates) {
        if (!(rule.when ?? ok)(res.statusCode)) continue;
        const m = rule.path.exec(path)!;
        const user = req.user;
        const detail = rule.detail?.(req, body, res.statusCode);
        const after = req.apiToken ? { ...(detail as object | undefined), via: `token:${req.apiToken.id}` } : detail;
        ctx.db
          .insert(audit)
          .values({
            userId: user?.id ?? null,
            actor: user ? actorLabel({ kind: 'user', userId: user.id, role: user.role, email: user.email }) : 'anonymous',
            action: rule.action,
            target: rule.target(m, req, body),
            after: after ?? null,
          })
          .then(() => undefined).catch((err: unknown) => ctx.logger.error(`could not write the audit entry ${rule.action}: ${(err as Error).message}`));
      }
    });
    next();
  };
}
