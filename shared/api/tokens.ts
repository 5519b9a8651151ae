import * as z from 'zod';

/**
 * Personal API token scopes: `read` may only look (GET/HEAD); `submit` may also upload
 * recordings, queue and cancel jobs. Neither reaches account or administration endpoints:
 * those need a signed-in browser session.
 */
export const TOKEN_SCOPES = ['read', 'submit'] as const;
export const tokenScopeSchema = z.enum(TOKEN_SCOPES, { error: 'scope must be "read" or "submit".' });
export type TokenScope = z.infer<typeof tokenScopeSchema>;

/** Tokens expire: at most a year, a month by default. */
export const TOKEN_MAX_DAYS = 365;

/** POST /api/tokens body. */
export const createTokenSchema = z.object({
  name: z.string().trim().min(1, 'Give the token a name that says where it is used, e.g. "survey laptop script".').max(100, 'Token names are at most 100 characters.'),
  scope: tokenScopeSchema,
  expiresInDays: z
    .number({ error: 'expiresInDays must be a whole number of days.' })
    .int('expiresInDays must be a whole number of days.')
    .min(1, 'expiresInDays must be at least 1.')
    .max(TOKEN_MAX_DAYS, `expiresInDays is at most ${TOKEN_MAX_DAYS}.`)
    .default(30),
});
export type CreateTokenRequest = z.input<typeof createTokenSchema>;

/** A token as lists show it (never the secret). */
export const apiTokenSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  prefix: z.string(),
  scope: tokenScopeSchema,
  createdAt: z.string(),
  expiresAt: z.string(),
  revokedAt: z.string().nullable(),
  lastUsedAt: z.string().nullable(),
  /** 'active', 'expired' or 'revoked'. */
  status: z.enum(['active', 'expired', 'revoked']),
});
export type ApiToken = z.infer<typeof apiTokenSchema>;

export const tokenListResponseSchema = z.object({ tokens: z.array(apiTokenSchema) });
export type TokenListResponse = z.infer<typeof tokenListResponseSchema>;

/** POST /api/tokens answer: the only time the secret is shown. */
export const createdTokenSchema = z.object({ token: apiTokenSchema, secret: z.string() });
export type CreatedToken = z.infer<typeof createdTokenSchema>;
