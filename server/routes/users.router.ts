import { Router } from 'express';
import { asc } from 'drizzle-orm';
import type { UserListResponse } from '../../shared/api/users.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { users } from '../db/schema/index.js';

/** /api/users: user administration (admin only). */
export function usersRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('admin'));
  router.get('/', async (_req, res) => {
    const rows = await ctx.db
      .select({ id: users.id, email: users.email, displayName: users.displayName, role: users.role, disabled: users.disabled, createdAt: users.createdAt })
      .from(users)
      .orderBy(asc(users.email));
    const body: UserListResponse = { users: rows.map((r) => ({ ...r, createdAt: r.createdAt.toISOString() })) };
    res.json(body);
  });
  return router;
}
