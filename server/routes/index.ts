import type { Router } from 'express';
import type { AppContext } from '../context.js';
import { archivesRouter } from './archives.router.js';
import { arraysRouter } from './arrays.router.js';
import { authRouter } from './auth.router.js';
import { healthRouter } from './health.router.js';
import { jobsRouter } from './jobs.router.js';
import { plotsRouter } from './plots.router.js';
import { queueRouter } from './queue.router.js';
import { recordingsRouter } from './recordings.router.js';
import { resultsRouter } from './results.router.js';
import { uploadsRouter } from './uploads.router.js';
import { usersRouter } from './users.router.js';
import { accountLinksRouter } from './users-account-links.router.js';
import { auditRouter } from './audit.router.js';
import { openapiRouter } from './openapi.router.js';
import { outboxRouter } from './outbox.router.js';
import { profileRouter } from './users-profile.router.js';
import { retentionRouter } from './settings-retention.router.js';
import { settingsRouter } from './settings.router.js';
import { tokensRouter } from './tokens.router.js';
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
    { path: '/api/results', router: resultsRouter(ctx) },
    { path: '/api/plots', router: plotsRouter(ctx) },
    { path: '/api/profile', router: profileRouter(ctx) },
    { path: '/api/account-links', router: accountLinksRouter(ctx) },
    { path: '/api/tokens', router: tokensRouter(ctx) },
    { path: '/api/settings', router: settingsRouter(ctx) },
    { path: '/api/retention', router: retentionRouter(ctx) },
    { path: '/api/audit', router: auditRouter(ctx) },
    { path: '/api/outbox', router: outboxRouter(ctx) },
    { path: '/api/openapi.json', router: openapiRouter(ctx) },
  ];
}
