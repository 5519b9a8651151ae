import { Router } from 'express';
import { z } from 'zod';
import { createUserSchema, resetPasswordSchema, updateUserSchema } from '../../shared/api/user-admin.js';
import type { UserListResponse } from '../../shared/api/users.js';
import { UserAdmin } from '../admin/user-admin.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';

const userIdSchema = z.coerce.number({ error: 'The user id must be a whole number.' }).int('The user id must be a whole number.').positive('The user id must be a positive number.');

/**
 * /api/users: account administration (admin only).
 *   GET    /                      every account
 *   POST   /                      create (with password) or invite (without: a one-time link is mailed)
 *   PATCH  /:id                   role, disabled, displayName (the last enabled admin is protected)
 *   POST   /:id/reset-password    set a password, or mail a one-time link (empty body)
 */
export function usersRouter(ctx: AppContext): Router {
  const router = Router();
  const admin = () => (ctx.services.userAdmin ??= new UserAdmin(ctx));
  router.use(requireRole('admin'));

  router.get('/', async (_req, res) => {
    const body: UserListResponse = { users: await admin().list() };
    res.json(body);
  });

  router.post('/', async (req, res) => {
    res.status(201).json(await admin().create(req.user!, createUserSchema.parse(req.body ?? {})));
  });

  router.patch('/:id', async (req, res) => {
    res.json({ user: await admin().update(req.user!, userIdSchema.parse(req.params.id), updateUserSchema.parse(req.body ?? {})) });
  });

  router.post('/:id/reset-password', async (req, res) => {
    const { password } = resetPasswordSchema.parse(req.body ?? {});
    res.json(await admin().resetPassword(req.user!, userIdSchema.parse(req.params.id), password));
  });
  return router;
}
