import * as z from 'zod';

/** GET /api/health (public). */
export const healthResponseSchema = z.object({
  status: z.literal('ok'),
  version: z.string(),
  database: z.enum(['pglite', 'postgres']),
  uptimeS: z.number(),
});
export type HealthResponse = z.infer<typeof healthResponseSchema>;
