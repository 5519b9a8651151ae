import type { RequestHandler } from 'express';
import type { SessionUser } from '../../shared/api/auth.js';
import { roleAtLeast, type Role } from '../../shared/roles.js';
import { forbidden, unauthorized } from '../http/http-error.js';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // passport puts the signed-in user here; ours is always a SessionUser.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
  }
}

/**
 * A guard that says which role it needs, so the route-coverage test (tests/server/roles.test.ts)
 * can find every guarded route and check it refuses a signed-out caller and a lower role.
 */
export type RoleGuard = RequestHandler & { readonly requiredRole: Role };

function guard(role: Role, handler: RequestHandler): RoleGuard {
  return Object.assign(handler, { requiredRole: role });
}

/** 401 unless the request carries a signed-in session (or, later, an API token). Any role passes. */
export const requireUser: RoleGuard = guard('analyst', (req, _res, next) => {
  next(req.user ? undefined : unauthorized());
});

/** 401 when signed out, 403 naming the role needed when the user's role is below `role`. */
export function requireRole(role: Role): RoleGuard {
  return guard(role, (req, _res, next) => {
    if (!req.user) return next(unauthorized());
    if (!roleAtLeast(req.user.role, role)) {
      return next(
        forbidden(`This needs the ${role} role or higher; you are signed in as ${req.user.role}. Ask an administrator to change your role.`),
      );
    }
    next();
  });
}
