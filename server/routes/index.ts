import type { Router } from 'express';
import type { AppContext } from '../context.js';
import { archivesRouter } from './archives.router.js';
import { arraysRouter } from './arrays.router.js';
import { authRouter } from './auth.router.js';
import { healthRouter } from './health.router.js';
import { jobsRouter } from './jobs.router.js';
import { queueRouter } from './queue.router.js';
import { recordingsRouter } from './recordings.router.js';
import { uploadsRouter } from './uploads.router.js';
import { usersRouter } from './users.router.js';
import { workersRouter } from './workers.router.js';

export interface RouteMount {
  /** Mount path, always under /api, e.g. '/api/jobs'. */
  path: string;
  router: Router;
}

/**
 * Every API router, one line per resource. Routers guard themselves (requireUser /
 * requireRole from server/auth/require-role.ts); only /api/health and /api/auth are public.
 */
export function apiRoutes(ctx: AppContext): RouteMount[] {
  return [
    { path: '/api/health', router: healthRouter(ctx) },
    { path: '/api/auth', router: authRouter(ctx) },
    { path: '/api/users', router: usersRouter(ctx) },
    { path: '/api/uploads', router: uploadsRouter(ctx) },
    { path: '/api/recordings', router: recordingsRouter(ctx) },
    { path: '/api/arrays', router: arraysRouter(ctx) },
    { path: '/api/archives', router: archivesRouter(ctx) },
    { path: '/api/jobs', router: jobsRouter(ctx) },
    { path: '/api/queue', router: queueRouter(ctx) },
    { path: '/api/workers', router: workersRouter(ctx) },
  ];
}
