import * as z from 'zod';

const GiB = 1024 ** 3;

/**
 * Settings an admin changes at run time (stored in the `settings` table). Each applies without
 * a restart: upload limits on the next upload, retention on the next sweep, worker concurrency
 * on the next claim. Archive roots have their own list (/api/archives).
 */
export const adminSettingsSchema = z.object({
  maxUploadBytes: z
    .number({ error: 'Maximum upload size must be a number of bytes.' })
    .int('Maximum upload size must be a whole number of bytes.')
    .min(1024 ** 2, 'Maximum upload size must be at least 1 MiB (1048576 bytes).')
    .max(16 * 1024 * GiB, 'Maximum upload size is at most 16 TiB.'),
  userQuotaBytes: z
    .number({ error: 'Per-user quota must be a number of bytes.' })
    .int('Per-user quota must be a whole number of bytes.')
    .min(1024 ** 2, 'Per-user quota must be at least 1 MiB (1048576 bytes).'),
  /** Days a finished job's results are kept; 0 keeps them for ever. */
  resultRetentionDays: z
    .number({ error: 'Result retention must be a number of days.' })
    .int('Result retention must be a whole number of days.')
    .min(0, 'Result retention must be 0 (keep for ever) or more days.')
    .max(3650, 'Result retention is at most 3650 days (ten years); use 0 to keep results for ever.'),
  workerConcurrency: z
    .number({ error: 'Worker concurrency must be a whole number of jobs.' })
    .int('Worker concurrency must be a whole number of jobs.')
    .min(1, 'Worker concurrency must be at least 1 job at a time.')
    .max(256, 'Worker concurrency is at most 256 jobs at a time.'),
});
export type AdminSettings = z.infer<typeof adminSettingsSchema>;

/** PATCH /api/settings body: any subset. */
export const adminSettingsPatchSchema = z
  .strictObject(adminSettingsSchema.partial().shape, {
    error: (issue) =>
      issue.code === 'unrecognized_keys'
        ? `Unknown setting ${issue.keys.join(', ')}; the settings are maxUploadBytes, userQuotaBytes, resultRetentionDays and workerConcurrency.`
        : 'Send the settings as a JSON object.',
  })
  .refine((p) => p.maxUploadBytes === undefined || p.userQuotaBytes === undefined || p.maxUploadBytes <= p.userQuotaBytes, {
    message: 'The maximum upload size cannot be larger than the per-user quota: no upload of that size could ever fit.',
    path: ['maxUploadBytes'],
  });
export type AdminSettingsPatch = z.infer<typeof adminSettingsPatchSchema>;

/** GET/PATCH /api/settings answer: the values and, per setting, when it takes effect. */
export const adminSettingsResponseSchema = z.object({
  settings: adminSettingsSchema,
  /** Per setting: where the value comes from ('default', 'environment' or 'admin'). */
  sources: z.record(z.string(), z.enum(['default', 'environment', 'admin'])),
  /** Results disk in use and the outcome of the last retention sweep. */
  retention: z.object({
    lastSweepAt: z.string().nullable(),
    lastSweepJobs: z.number().int(),
    lastSweepBytes: z.number(),
  }),
});
export type AdminSettingsResponse = z.infer<typeof adminSettingsResponseSchema>;
