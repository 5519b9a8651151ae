import { Router } from 'express';
import { eq } from 'drizzle-orm';
import { profilePatchSchema, type Profile } from '../../shared/api/profile.js';
import { requireUser } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { userPreferences, users } from '../db/schema/index.js';

/**
 * /api/profile: the signed-in person's own settings (morning digest, display name).
 *   GET   /   PATCH /
 */
export function profileRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireUser);

  const read = async (id: number): Promise<Profile> => {
    const [row] = await ctx.db
      .select({ email: users.email, displayName: users.displayName, role: users.role, dailyDigest: userPreferences.dailyDigest })
      .from(users)
      .leftJoin(userPreferences, eq(userPreferences.userId, users.id))
      .where(eq(users.id, id));
    return { email: row.email, displayName: row.displayName, role: row.role, dailyDigest: row.dailyDigest ?? false };
  };

  router.get('/', async (req, res) => {
    res.json(await read(req.user!.id));
  });

  router.patch('/', async (req, res) => {
    const patch = profilePatchSchema.parse(req.body ?? {});
    const id = req.user!.id;
    if (patch.dailyDigest !== undefined) {
      await ctx.db
        .insert(userPreferences)
        .values({ userId: id, dailyDigest: patch.dailyDigest })
        .onConflictDoUpdate({ target: userPreferences.userId, set: { dailyDigest: patch.dailyDigest, updatedAt: new Date() } });
    }
    if (patch.displayName !== undefined) await ctx.db.update(users).set({ displayName: patch.displayName, updatedAt: new Date() }).where(eq(users.id, id));
    res.json(await read(id));
  });
  return router;
}
