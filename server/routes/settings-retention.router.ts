import { Router } from 'express';
import { z } from 'zod';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';
import { actorOf } from './jobs.router.js';

const jobIdSchema = z.coerce.number({ error: 'The job id must be a whole number.' }).int('The job id must be a whole number.').positive('The job id must be a positive number.');
const pinSchema = z.object({ note: z.string().trim().max(500, 'Pin notes are at most 500 characters.').default('') });

/**
 * /api/retention: result retention.
 *   GET    /              last sweep and pinned jobs (operations)
 *   POST   /sweep         delete expired results now (admin)
 *   PUT    /pins/:jobId   keep a job's results whatever their age (operations)
 *   DELETE /pins/:jobId   stop keeping them (operations)
 */
export function retentionRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('operations'));
  const service = () => {
    const s = ctx.services.retention;
    if (!s) throw new HttpError(503, 'retention_unavailable', 'Result retention is not running on this server; check the server log for a start-up error.');
    return s;
  };
  router.get('/', async (_req, res) => {
    res.json({ lastSweep: (await service().lastSweep()) ?? null, pins: await service().pins() });
  });
  router.post('/sweep', requireRole('admin'), async (req, res) => {
    res.json(await service().sweep(actorOf(req)));
  });
  router.put('/pins/:jobId', async (req, res) => {
    const id = jobIdSchema.parse(req.params.jobId);
    await service().pin(req.user!, id, pinSchema.parse(req.body ?? {}).note);
    res.status(204).end();
  });
  router.delete('/pins/:jobId', async (req, res) => {
    await service().unpin(req.user!, jobIdSchema.parse(req.params.jobId));
    res.status(204).end();
  });
  return router;
}
