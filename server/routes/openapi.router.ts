import { Router } from 'express';
import type { AppContext } from '../context.js';
import { buildOpenApi } from '../openapi/build-openapi.js';

/** /api/openapi.json: the OpenAPI 3.1 description of the HTTP API (public, like the README). */
export function openapiRouter(_ctx: AppContext): Router {
  const router = Router();
  let doc: unknown;
  router.get('/', (_req, res) => {
    doc ??= buildOpenApi();
    res.json(doc);
  });
  return router;
}
