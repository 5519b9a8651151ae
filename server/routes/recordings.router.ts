import { Router } from 'express';
import { recordingListQuerySchema, recordingPatchSchema } from '../../shared/api/recordings.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { badRequest } from '../http/http-error.js';
import { recordingKit } from '../recordings/recording-kit.js';

/**
 * /api/recordings: the recordings table (server-side sort, filter, pages), detail with QC and
 * the jobs that used it, rename / link an array, delete, re-inspect.
 */
export function recordingsRouter(ctx: AppContext): Router {
  const kit = recordingKit(ctx);
  const router = Router();
  router.use(requireRole('analyst'));

  router.get('/', async (req, res) => {
    res.json(await kit.recordings.list(recordingListQuerySchema.parse(req.query)));
  });

  router.get('/:id', async (req, res) => {
    res.json(await kit.recordings.detail(idParam(req.params.id)));
  });

  router.patch('/:id', async (req, res) => {
    res.json(await kit.recordings.patch(idParam(req.params.id), recordingPatchSchema.parse(req.body ?? {}), req.user!));
  });

  router.delete('/:id', async (req, res) => {
    await kit.recordings.remove(idParam(req.params.id), req.user!);
    res.status(204).end();
  });

  router.post('/:id/inspect', async (req, res) => {
    const id = idParam(req.params.id);
    await kit.recordings.markForInspection(id, req.user!);
    void kit.inspector.enqueue(id);
    res.status(202).json(await kit.recordings.detail(id));
  });
  return router;
}

export function idParam(raw: unknown): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw badRequest(`"${String(raw)}" is not an id; ids are whole numbers from 1.`);
  return id;
}
