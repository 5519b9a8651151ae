import { Router } from 'express';
import { createUploadSchema } from '../../shared/api/uploads.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { recordingKit } from '../recordings/recording-kit.js';
import { readChunkRequest } from '../uploads/multipart-chunk.js';

/**
 * /api/uploads: resumable chunked uploads (README "Uploads").
 *   POST /                      open a session {name, sizeBytes, format, sha256?, sidecar?, sidecarName?}
 *   GET  /                      your unfinished sessions
 *   GET  /:id                   a session with the chunks the server holds (resume from here)
 *   POST /:id/chunks/:index     multipart: field sha256, file part "chunk"
 *   POST /:id/complete          all chunks in: becomes a recording, inspected in a compute child
 *   DELETE /:id                 cancel: the partial file is removed
 */
export function uploadsRouter(ctx: AppContext): Router {
  const kit = recordingKit(ctx);
  const router = Router();
  router.use(requireRole('analyst'));

  router.get('/', async (req, res) => {
    res.json({ uploads: await kit.uploads.listOpen(req.user!.id) });
  });

  router.post('/', async (req, res) => {
    const body = createUploadSchema.parse(req.body ?? {});
    res.status(201).json(await kit.uploads.create(req.user!.id, body));
  });

  router.get('/:id', async (req, res) => {
    res.json(await kit.uploads.get(req.user!.id, req.params.id, req.user!.role === 'admin'));
  });

  router.post('/:id/chunks/:index', async (req, res) => {
    const target = await kit.uploads.chunkTarget(req.user!.id, req.params.id, Number(req.params.index));
    const { stored, claimedSha } = await readChunkRequest(req, target.length, (file) => kit.uploads.storeChunk(target, file));
    res.json(await kit.uploads.acknowledgeChunk(target, stored, claimedSha));
  });

  router.post('/:id/complete', async (req, res) => {
    const done = await kit.uploads.complete(req.user!.id, req.params.id);
    res.status(202).json(done);
  });

  router.delete('/:id', async (req, res) => {
    await kit.uploads.cancel(req.user!.id, req.params.id, req.user!.role === 'admin');
    res.status(204).end();
  });
  return router;
}
