import { Router } from 'express';
import { z } from 'zod';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { listNodes } from '../queue/list-nodes.js';
import { actorOf, queueService } from './jobs.router.js';

/** A node whose heartbeat is older than this is shown as lost (its leases expire soon after). */
const STALE_AFTER_MS = 15_000;

const drainSchema = z.object({ draining: z.boolean({ error: 'draining must be true or false.' }).default(true) });

/** /api/workers (operations): the nodes, their heartbeat age, jobs, rate and compute children; drain one. */
export function workersRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('operations'));

  router.get('/', async (_req, res) => {
    const nodes = await listNodes(ctx.db, STALE_AFTER_MS);
    const own = ctx.services.jobNode?.id;
    res.json({
      nodes: nodes.map((n) => (n.id === own && ctx.compute ? { ...n, children: ctx.compute.status().children } : n)),
    });
  });

  router.post('/:id/drain', async (req, res) => {
    const { draining } = drainSchema.parse(req.body ?? {});
    const node = await queueService(ctx).setDraining(req.params.id, draining, actorOf(req));
    res.json({
      node: { id: node.id, draining: node.draining },
      message: draining ? 'Draining: the node finishes its current jobs and claims no new ones.' : 'The node claims jobs again.',
    });
  });

  return router;
}
