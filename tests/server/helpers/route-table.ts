/**
 * Lists every API route of the app with the roles its guards demand, by walking the routers
 * of server/routes/index.ts. Guards are found by the `requiredRole` tag that requireUser and
 * requireRole carry (server/auth/require-role.ts).
 */
import type { Router } from 'express';
import { ROLES, type Role } from '../../../shared/roles.js';
import type { AppContext } from '../../../server/context.js';
import { apiRoutes } from '../../../server/routes/index.js';

export interface RouteInfo {
  method: string;
  /** Full path with Express parameters, e.g. /api/jobs/:id/cancel. */
  path: string;
  /** The highest role any guard on the way demands; undefined when no guard was found. */
  requiredRole?: Role;
}

interface LayerLike {
  rawPath?: unknown;
  handle: ((...a: unknown[]) => unknown) & { stack?: LayerLike[]; requiredRole?: Role };
  route?: { path: unknown; methods: Record<string, boolean>; stack: LayerLike[] };
}

export function listApiRoutes(ctx: AppContext): RouteInfo[] {
  const out: RouteInfo[] = [];
  for (const mount of apiRoutes(ctx)) walk(mount.router as unknown as { stack: LayerLike[] }, mount.path, undefined, out);
  return out;
}

function walk(router: { stack: LayerLike[] }, prefix: string, inherited: Role | undefined, out: RouteInfo[]): void {
  let role = inherited;
  for (const layer of router.stack) {
    if (layer.route) {
      let routeRole = role;
      for (const l of layer.route.stack) routeRole = higher(routeRole, l.handle.requiredRole);
      for (const p of paths(layer.route.path)) {
        for (const [method, on] of Object.entries(layer.route.methods)) {
          if (on && method !== '_all') out.push({ method: method.toUpperCase(), path: join(prefix, p), requiredRole: routeRole });
        }
      }
    } else if (layer.handle.stack) {
      for (const p of paths(layer.rawPath)) walk({ stack: layer.handle.stack }, join(prefix, p), role, out);
    } else if (layer.handle.requiredRole && paths(layer.rawPath).includes('/')) {
      // router.use(guard) guards every route registered after it
      role = higher(role, layer.handle.requiredRole);
    }
  }
}

const paths = (p: unknown): string[] => (Array.isArray(p) ? p.map(String) : [typeof p === 'string' ? p : '/']);
const join = (a: string, b: string): string => (b === '/' ? a : `${a.replace(/\/$/, '')}/${b.replace(/^\//, '')}`);
function higher(a: Role | undefined, b: Role | undefined): Role | undefined {
  if (!a) return b;
  if (!b) return a;
  return ROLES.indexOf(a) >= ROLES.indexOf(b) ? a : b;
}

/** A concrete URL for a route pattern: parameters become harmless sample values. */
export function sampleUrl(pattern: string): string {
  return pattern.replace(/\{?\*\w+\}?/g, 'x').replace(/:(\w+)/g, (_m, name: string) => (/id$|index$/i.test(name) ? '1' : 'x'));
}
