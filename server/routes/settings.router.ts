import { Router } from 'express';
import type { AdminSettingsResponse } from '../../shared/api/admin-settings.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/http-error.js';

/**
 * /api/settings: run-time settings (admin). Changes apply without a restart.
 *   GET /     PATCH /  (any subset of maxUploadBytes, userQuotaBytes, resultRetentionDays, workerConcurrency)
 */
export function settingsRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('admin'));
  const service = () => {
    const s = ctx.services.adminSettings;
    if (!s) throw new HttpError(503, 'settings_unavailable', 'Settings are not loaded on this server; check the server log for a start-up error.');
    return s;
  };
  const answer = async (): Promise<AdminSettingsResponse> => {
    const last = await ctx.services.retention?.lastSweep();
    return {
      settings: service().values,
      sources: service().valueSources,
      retention: { lastSweepAt: last?.at ?? null, lastSweepJobs: last?.jobIds.length ?? 0, lastSweepBytes: last?.bytesReclaimed ?? 0 },
    };
  };
  router.get('/', async (_req, res) => {
    res.json(await answer());
  });
  router.patch('/', async (req, res) => {
    await service().update(req.user!, req.body);
    res.json(await answer());
  });
  return router;
}
