import { Router } from 'express';
import { arrayRequestSchema } from '../../shared/api/arrays.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { recordingKit } from '../recordings/recording-kit.js';
import { idParam } from './recordings.router.js';

/**
 * /api/arrays: the arrays catalogue. PUT on a version a job used creates a new version
 * (the response is the new row); GET /:id/versions lists the lineage.
 */
export function arraysRouter(ctx: AppContext): Router {
  const kit = recordingKit(ctx);
  const router = Router();
  router.use(requireRole('analyst'));

  router.get('/', async (req, res) => {
    res.json({ arrays: await kit.arrays.list(req.query.history === '1' || req.query.history === 'true') });
  });
  router.get('/:id', async (req, res) => {
    res.json(await kit.arrays.get(idParam(req.params.id)));
  });
  router.get('/:id/versions', async (req, res) => {
    res.json({ arrays: await kit.arrays.history(idParam(req.params.id)) });
  });
  router.post('/', async (req, res) => {
    res.status(201).json(await kit.arrays.create(arrayRequestSchema.parse(req.body ?? {}), req.user!));
  });
  router.put('/:id', async (req, res) => {
    res.json(await kit.arrays.update(idParam(req.params.id), arrayRequestSchema.parse(req.body ?? {}), req.user!));
  });
  router.delete('/:id', requireRole('operations'), async (req, res) => {
    await kit.arrays.remove(idParam(req.params.id));
    res.status(204).end();
  });
  return router;
}
