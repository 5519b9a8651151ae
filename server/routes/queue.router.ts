import { Router } from 'express';
import { requireRole, requireUser } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { getQueueStatus } from '../queue/queue-status.js';
import { actorOf, queueService } from './jobs.router.js';

/** /api/queue: status for everyone signed in; pause and resume for operations (audited). */
export function queueRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireUser);

  router.get('/', async (_req, res) => {
    res.json(await getQueueStatus(ctx.db));
  });

  router.post('/pause', requireRole('operations'), async (req, res) => {
    await queueService(ctx).setPaused(true, actorOf(req));
    res.json({ ...(await getQueueStatus(ctx.db)), message: 'Paused: running jobs carry on, nothing new starts until you resume.' });
  });

  router.post('/resume', requireRole('operations'), async (req, res) => {
    await queueService(ctx).setPaused(false, actorOf(req));
    res.json({ ...(await getQueueStatus(ctx.db)), message: 'Resumed.' });
  });

  return router;
}
