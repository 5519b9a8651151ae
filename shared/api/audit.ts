import * as z from 'zod';

/** One audit entry as the API shows it. */
export const auditEntrySchema = z.object({
  id: z.number().int(),
  at: z.string(),
  userId: z.number().int().nullable(),
  actor: z.string(),
  action: z.string(),
  target: z.string(),
  before: z.unknown(),
  after: z.unknown(),
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;

const isoDate = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO date-time, e.g. 2026-12-01T00:00:00Z.` });

/** GET /api/audit and /api/audit/export.csv query: every filter optional, combined with AND. */
export const auditQuerySchema = z.object({
  /** Action name or prefix, e.g. 'job.' or 'auth.sign-in'. */
  action: z.string().trim().max(100, 'action is at most 100 characters.').optional(),
  /** Matches the actor label (user id or e-mail, node id), case-insensitive. */
  actor: z.string().trim().max(200, 'actor is at most 200 characters.').optional(),
  /** Target such as 'job:42' (exact) or 'job:' (prefix). */
  target: z.string().trim().max(200, 'target is at most 200 characters.').optional(),
  from: isoDate('from').optional(),
  to: isoDate('to').optional(),
  limit: z.coerce.number({ error: 'limit must be a number.' }).int('limit must be a whole number.').min(1, 'limit must be at least 1.').max(500, 'limit is at most 500.').default(100),
  /** Entries with an id below this (the previous page's last id). */
  before: z.coerce.number({ error: 'before must be an entry id.' }).int('before must be an entry id.').positive('before must be an entry id.').optional(),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;

export const auditListResponseSchema = z.object({ entries: z.array(auditEntrySchema), nextBefore: z.number().int().nullable() });
export type AuditListResponse = z.infer<typeof auditListResponseSchema>;
