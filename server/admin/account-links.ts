import { and, eq, gt, isNull } from 'drizzle-orm';
import type { AccountLinkInfo } from '../../shared/api/user-admin.js';
import { hashPassword } from '../auth/password.js';
import type { AppDb } from '../db/client.js';
import { accountLinks, audit, sessions, users } from '../db/schema/index.js';
import { HttpError } from '../http/http-error.js';
import { secretDigest } from '../tokens/token-secret.js';
import { sql } from 'drizzle-orm';

const gone = () =>
  new HttpError(410, 'link_unusable', 'This link was already used, has expired, or was replaced by a newer one. Ask an administrator to send a new link.');

async function find(db: AppDb, secret: string) {
  const [hit] = await db
    .select({ link: accountLinks, user: users })
    .from(accountLinks)
    .innerJoin(users, eq(users.id, accountLinks.userId))
    .where(eq(accountLinks.secretSha256, secretDigest(secret)));
  if (!hit || hit.link.usedAt || hit.link.expiresAt.getTime() <= Date.now()) throw gone();
  return hit;
}

/** Who a one-time link is for (the set-password page shows it before asking for a password). */
export async function describeLink(db: AppDb, secret: string): Promise<AccountLinkInfo> {
  const { link, user } = await find(db, secret);
  return { email: user.email, displayName: user.displayName, purpose: link.purpose, expiresAt: link.expiresAt.toISOString() };
}

/** Sets the password and uses the link up, in one transaction: a link works exactly once. */
export async function useLink(db: AppDb, secret: string, password: string): Promise<void> {
  const { user } = await find(db, secret);
  const passwordHash = await hashPassword(password);
  await db.transaction(async (tx) => {
    const used = await tx
      .update(accountLinks)
      .set({ usedAt: new Date() })
      .where(and(eq(accountLinks.secretSha256, secretDigest(secret)), isNull(accountLinks.usedAt), gt(accountLinks.expiresAt, new Date())))
      .returning({ purpose: accountLinks.purpose });
    if (used.length === 0) throw gone();
    await tx.update(users).set({ passwordHash, updatedAt: new Date() }).where(eq(users.id, user.id));
    await tx.delete(sessions).where(sql`(${sessions.data} -> 'passport' ->> 'user') = ${String(user.id)}`);
    await tx.insert(audit).values({ userId: user.id, actor: `user:${user.id} ${user.email}`, action: 'user.password-chosen', target: `user:${user.id}`, after: { via: used[0].purpose } });
  });
}
