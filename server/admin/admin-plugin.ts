import { z } from 'zod';
import type { ServerPlugin } from '../plugins.js';
import { RetentionService } from '../retention/retention-service.js';
import { AdminSettingsService } from './admin-settings.js';
import { UserAdmin } from './user-admin.js';

declare module '../context.js' {
  interface AppServices {
    adminSettings?: AdminSettingsService;
    userAdmin?: UserAdmin;
    retention?: RetentionService;
  }
}

/** RETENTION_SWEEP_MINUTES: how often the scheduled retention sweep runs (default hourly). */
const sweepEvery = z.coerce
  .number({ error: 'RETENTION_SWEEP_MINUTES must be a number of minutes' })
  .positive('RETENTION_SWEEP_MINUTES must be more than 0')
  .default(60);

/**
 * Administration services: run-time settings (loaded and applied at start), account
 * administration, and result retention with its scheduled sweep (first one a minute after
 * start, then every RETENTION_SWEEP_MINUTES). List it after the queue, recordings and mail plugins.
 */
export const adminPlugin: ServerPlugin = {
  name: 'admin',
  async start(ctx) {
    const parsed = sweepEvery.safeParse(process.env.RETENTION_SWEEP_MINUTES || undefined);
    if (!parsed.success) throw new Error(`${parsed.error.issues[0]?.message}.`);
    const settings = new AdminSettingsService(ctx);
    await settings.load();
    ctx.services.adminSettings = settings;
    ctx.services.userAdmin = new UserAdmin(ctx);
    const retention = new RetentionService(ctx, () => settings.values.resultRetentionDays);
    ctx.services.retention = retention;
    const run = () => void retention.sweep('schedule').catch((err: unknown) => ctx.logger.error(`retention sweep failed: ${(err as Error).message}`));
    const first = setTimeout(run, 60_000);
    const timer = setInterval(run, parsed.data * 60_000);
    first.unref();
    timer.unref();
    timers.set(ctx, [first, timer]);
  },
  stop(ctx) {
    for (const t of timers.get(ctx) ?? []) clearTimeout(t);
  },
};

const timers = new WeakMap<object, NodeJS.Timeout[]>();
