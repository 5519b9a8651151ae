import { Router } from 'express';
import { sql } from 'drizzle-orm';
import type { HealthResponse } from '../../shared/api/health.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';
import { APP_VERSION } from '../version.js';

/** GET /api/health: public liveness check that also proves the database answers. */
export function healthRouter(ctx: AppContext): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    try {
      await ctx.db.execute(sql`select 1`);
    } catch (err) {
      ctx.logger.error('health check: database did not answer', { error: String(err) });
      throw new HttpError(503, 'database_unavailable', 'The database is not answering. Check the server log and the database (DATA_DIR or DATABASE_URL), then retry.');
    }
    const body: HealthResponse = {
      status: 'ok',
      version: APP_VERSION,
      database: ctx.dbKind,
      uptimeS: Math.round((Date.now() - ctx.startedAt) / 1000),
    };
    res.json(body);
  });
  return router;
}
