import { Router } from 'express';
import { archiveRegisterSchema, archiveRootRequestSchema } from '../../shared/api/recordings.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { recordingKit } from '../recordings/recording-kit.js';
import { idParam } from './recordings.router.js';

/**
 * /api/archives: archive roots (admins add and remove them), browsing, and in-place
 * registration of files under a root (analysts). Registered files are inspected like uploads.
 */
export function archivesRouter(ctx: AppContext): Router {
  const kit = recordingKit(ctx);
  const router = Router();
  router.use(requireRole('analyst'));

  router.get('/', async (_req, res) => {
    res.json({ roots: await kit.archives.listRoots() });
  });
  router.post('/', requireRole('admin'), async (req, res) => {
    res.status(201).json(await kit.archives.addRoot(archiveRootRequestSchema.parse(req.body ?? {})));
  });
  router.delete('/:id', requireRole('admin'), async (req, res) => {
    await kit.archives.removeRoot(idParam(req.params.id));
    res.status(204).end();
  });
  router.get('/:id/browse', async (req, res) => {
    const rel = typeof req.query.path === 'string' ? req.query.path : '';
    res.json(await kit.archives.browse(idParam(req.params.id), rel));
  });
  router.post('/:id/register', async (req, res) => {
    const { created, ...result } = await kit.archives.register(idParam(req.params.id), archiveRegisterSchema.parse(req.body ?? {}), req.user!);
    for (const id of created) void kit.inspector.enqueue(id);
    res.status(result.registered.length ? 201 : 200).json(result);
  });
  return router;
}
