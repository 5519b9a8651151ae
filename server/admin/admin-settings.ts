import { eq } from 'drizzle-orm';
import { z } from 'zod';
import type { SessionUser } from '../../shared/api/auth.js';
import { adminSettingsPatchSchema, type AdminSettings, type AdminSettingsPatch } from '../../shared/api/admin-settings.js';
import type { AppContext } from '../context.js';
import { settings } from '../db/schema/index.js';
import { HttpError } from '../http/http-error.js';
import { writeAudit } from '../queue/write-audit.js';
import { recordingKit } from '../recordings/recording-kit.js';

const KEY = 'admin_settings';
type Source = 'default' | 'environment' | 'admin';

/** RESULT_RETENTION_DAYS: the starting value of result retention before an admin sets one (0 = keep for ever). */
const retentionEnv = z.coerce
  .number({ error: 'RESULT_RETENTION_DAYS must be a whole number of days (0 keeps results for ever)' })
  .int('RESULT_RETENTION_DAYS must be a whole number of days')
  .min(0, 'RESULT_RETENTION_DAYS must be 0 or more')
  .optional();

/**
 * Run-time settings: start from the environment (UPLOAD_MAX_BYTES, UPLOAD_QUOTA_BYTES,
 * RESULT_RETENTION_DAYS, WORKER_CONCURRENCY), overridden by what an admin stored. Applying
 * needs no restart: upload limits are read by every new upload, the node and compute pool
 * change their concurrency in place, and the retention sweep reads the value each time.
 */
export class AdminSettingsService {
  private current!: AdminSettings;
  private sources!: Record<keyof AdminSettings, Source>;

  constructor(private readonly ctx: AppContext) {}

  /** Reads the stored values and applies them (plugin start). */
  async load(): Promise<void> {
    const limits = recordingKit(this.ctx).limits;
    const env = process.env;
    const r = retentionEnv.safeParse(env.RESULT_RETENTION_DAYS === '' ? undefined : env.RESULT_RETENTION_DAYS);
    if (!r.success) throw new Error(`Retention setting is not valid: ${r.error.issues[0]?.message}.`);
    const base: AdminSettings = {
      maxUploadBytes: limits.maxFileBytes,
      userQuotaBytes: limits.quotaBytes,
      resultRetentionDays: r.data ?? 0,
      workerConcurrency: this.ctx.config.workerConcurrency,
    };
    const fromEnv = (name: string): Source => (env[name] ? 'environment' : 'default');
    this.sources = {
      maxUploadBytes: fromEnv('UPLOAD_MAX_BYTES'),
      userQuotaBytes: fromEnv('UPLOAD_QUOTA_BYTES'),
      resultRetentionDays: fromEnv('RESULT_RETENTION_DAYS'),
      workerConcurrency: fromEnv('WORKER_CONCURRENCY'),
    };
    const stored = await this.readStored();
    for (const k of Object.keys(stored) as (keyof AdminSettings)[]) this.sources[k] = 'admin';
    this.current = { ...base, ...stored };
    this.apply();
  }

  get values(): AdminSettings {
    return { ...this.current };
  }

  get valueSources(): Record<string, Source> {
    return { ...this.sources };
  }

  /** Validates a change against the merged result, stores it, applies it and audits it. */
  async update(admin: SessionUser, input: unknown): Promise<AdminSettings> {
    const patch = adminSettingsPatchSchema.parse(input ?? {});
    const next = { ...this.current, ...patch };
    if (next.maxUploadBytes > next.userQuotaBytes) {
      throw new HttpError(400, 'invalid_input', 'The maximum upload size cannot be larger than the per-user quota: no upload of that size could ever fit. Raise the quota or lower the maximum.', [
        { path: 'maxUploadBytes', message: 'larger than userQuotaBytes' },
      ]);
    }
    const stored = { ...(await this.readStored()), ...patch };
    await this.ctx.db
      .insert(settings)
      .values({ key: KEY, value: stored })
      .onConflictDoUpdate({ target: settings.key, set: { value: stored, updatedAt: new Date() } });
    const before = Object.fromEntries(Object.keys(patch).map((k) => [k, this.current[k as keyof AdminSettings]]));
    this.current = next;
    for (const k of Object.keys(patch) as (keyof AdminSettings)[]) this.sources[k] = 'admin';
    this.apply();
    await writeAudit(this.ctx.db, { actor: { kind: 'user', userId: admin.id, role: admin.role, email: admin.email }, action: 'settings.change', target: 'settings', before, after: patch });
    return this.values;
  }

  private async readStored(): Promise<AdminSettingsPatch> {
    const [row] = await this.ctx.db.select({ value: settings.value }).from(settings).where(eq(settings.key, KEY));
    if (!row) return {};
    const parsed = adminSettingsPatchSchema.safeParse(row.value);
    if (!parsed.success) {
      this.ctx.logger.warn(`stored admin settings are not valid (${parsed.error.issues[0]?.message}); using the environment's values until an admin saves them again`);
      return {};
    }
    return parsed.data;
  }

  private apply(): void {
    const limits = recordingKit(this.ctx).limits;
    limits.maxFileBytes = this.current.maxUploadBytes;
    limits.quotaBytes = this.current.userQuotaBytes;
    const n = this.current.workerConcurrency;
    this.ctx.services.jobNode?.setConcurrency(n);
    // one slot more than jobs, as the compute plugin sizes it: inspections never wait behind jobs
    (this.ctx.compute as { setConcurrency?: (n: number) => void } | undefined)?.setConcurrency?.(n + 1);
  }
}
