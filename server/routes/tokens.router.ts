import { Router } from 'express';
import { z } from 'zod';
import { createTokenSchema } from '../../shared/api/tokens.js';
import { requireUser } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { createToken, listTokens, revokeToken } from '../tokens/token-service.js';

const tokenIdSchema = z.coerce.number({ error: 'The token id must be a whole number.' }).int('The token id must be a whole number.').positive('The token id must be a positive number.');

/**
 * /api/tokens: your personal API tokens.
 *   GET    /       yours (never the secrets)
 *   POST   /       {name, scope, expiresInDays}: the secret is in this answer only
 *   DELETE /:id    revoke (admins may revoke anyone's)
 */
export function tokensRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req, res) => {
    res.json({ tokens: await listTokens(ctx.db, req.user!.id) });
  });
  router.post('/', async (req, res) => {
    res.status(201).json(await createToken(ctx.db, req.user!, createTokenSchema.parse(req.body ?? {})));
  });
  router.delete('/:id', async (req, res) => {
    res.json({ token: await revokeToken(ctx.db, req.user!, tokenIdSchema.parse(req.params.id)) });
  });
  return router;
}
