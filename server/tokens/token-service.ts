import { and, desc, eq } from 'drizzle-orm';
import type { SessionUser } from '../../shared/api/auth.js';
import type { ApiToken, CreatedToken, CreateTokenRequest, TokenScope } from '../../shared/api/tokens.js';
import { createTokenSchema } from '../../shared/api/tokens.js';
import { toSessionUser } from '../auth/users.js';
import type { AppDb } from '../db/client.js';
import { apiTokens, users, type ApiTokenRow } from '../db/schema/index.js';
import { HttpError, notFound } from '../http/http-error.js';
import { writeAudit } from '../queue/write-audit.js';
import { displayPrefix, newSecret, secretDigest, TOKEN_PREFIX } from './token-secret.js';

const DAY_MS = 86_400_000;
/** Last-used stamps are written at most this often per token (one UPDATE per request would be wasteful). */
const TOUCH_EVERY_MS = 60_000;

function status(row: ApiTokenRow, now = Date.now()): ApiToken['status'] {
  if (row.revokedAt) return 'revoked';
  return row.expiresAt.getTime() <= now ? 'expired' : 'active';
}

export function toApiToken(row: ApiTokenRow): ApiToken {
  return {
    id: row.id,
    name: row.name,
    prefix: row.prefix,
    scope: row.scope,
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
    revokedAt: row.revokedAt?.toISOString() ?? null,
    lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
    status: status(row),
  };
}

const actorOf = (u: SessionUser) => ({ kind: 'user' as const, userId: u.id, role: u.role, email: u.email });

export async function createToken(db: AppDb, user: SessionUser, input: CreateTokenRequest): Promise<CreatedToken> {
  const req = createTokenSchema.parse(input);
  const secret = newSecret();
  const [row] = await db
    .insert(apiTokens)
    .values({
      userId: user.id,
      name: req.name,
      prefix: displayPrefix(secret),
      secretSha256: secretDigest(secret),
      scope: req.scope,
      expiresAt: new Date(Date.now() + req.expiresInDays * DAY_MS),
    })
    .returning();
  await writeAudit(db, { actor: actorOf(user), action: 'token.create', target: `token:${row.id}`, after: { name: row.name, scope: row.scope, expiresAt: row.expiresAt.toISOString() } });
  return { token: toApiToken(row), secret };
}

export async function listTokens(db: AppDb, userId: number): Promise<ApiToken[]> {
  const rows = await db.select().from(apiTokens).where(eq(apiTokens.userId, userId)).orderBy(desc(apiTokens.createdAt));
  return rows.map(toApiToken);
}

/** Revokes one of the caller's tokens (admins may revoke anyone's). Revoking twice is harmless. */
export async function revokeToken(db: AppDb, user: SessionUser, id: number): Promise<ApiToken> {
  const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, id));
  if (!row || (row.userId !== user.id && user.role !== 'admin')) throw notFound(`There is no token ${id} of yours. Reload the token list.`);
  if (row.revokedAt) return toApiToken(row);
  const [after] = await db.update(apiTokens).set({ revokedAt: new Date() }).where(and(eq(apiTokens.id, id))).returning();
  await writeAudit(db, { actor: actorOf(user), action: 'token.revoke', target: `token:${id}`, before: { name: row.name, owner: row.userId } });
  return toApiToken(after);
}

/**
 * The user and scope behind a bearer secret, or an HttpError 401 that says what is wrong
 * (unknown, expired, revoked, or the account is disabled).
 */
export async function authenticateToken(db: AppDb, secret: string): Promise<{ user: SessionUser; tokenId: number; scope: TokenScope }> {
  if (!secret.startsWith(TOKEN_PREFIX)) {
    throw new HttpError(401, 'invalid_token', `That is not a Nullsmith API token (they start with "${TOKEN_PREFIX}"). Create one on your Profile page and send it as "Authorization: Bearer <token>".`);
  }
  const [hit] = await db
    .select({ token: apiTokens, user: users })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.secretSha256, secretDigest(secret)));
  if (!hit) throw new HttpError(401, 'invalid_token', 'This API token is not known: it may have been mistyped or deleted. Create a new one on your Profile page.');
  const { token, user } = hit;
  if (token.revokedAt) throw new HttpError(401, 'token_revoked', `API token "${token.name}" was revoked on ${token.revokedAt.toISOString()}. Create a new one on your Profile page.`);
  if (token.expiresAt.getTime() <= Date.now()) {
    throw new HttpError(401, 'token_expired', `API token "${token.name}" expired on ${token.expiresAt.toISOString()}. Create a new one on your Profile page.`);
  }
  if (user.disabled) throw new HttpError(403, 'account_disabled', 'The account this API token belongs to is disabled. Ask an administrator to enable it.');
  if (!token.lastUsedAt || Date.now() - token.lastUsedAt.getTime() > TOUCH_EVERY_MS) {
    await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, token.id));
  }
  return { user: toSessionUser(user), tokenId: token.id, scope: token.scope };
}
