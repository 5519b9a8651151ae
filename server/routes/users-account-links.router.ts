import { Router } from 'express';
import { useAccountLinkSchema } from '../../shared/api/user-admin.js';
import { describeLink, useLink } from '../admin/account-links.js';
import type { AppContext } from '../context.js';

/**
 * /api/account-links: public, for people following a one-time invitation or reset link.
 *   GET  /:secret   who the link is for (410 when used, expired or replaced)
 *   POST /:secret   {password}: sets the password and uses the link up
 */
export function accountLinksRouter(ctx: AppContext): Router {
  const router = Router();
  router.get('/:secret', async (req, res) => {
    res.json(await describeLink(ctx.db, req.params.secret));
  });
  router.post('/:secret', async (req, res) => {
    const { password } = useAccountLinkSchema.parse(req.body ?? {});
    await useLink(ctx.db, req.params.secret, password);
    res.status(204).end();
  });
  return router;
}
