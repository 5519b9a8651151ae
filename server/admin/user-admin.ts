import crypto from 'node:crypto';
import { and, asc, eq, isNull, ne, sql } from 'drizzle-orm';
import type { SessionUser } from '../../shared/api/auth.js';
import type { CreateUserRequest, UpdateUserRequest, UserActionResponse } from '../../shared/api/user-admin.js';
import type { UserSummary } from '../../shared/api/users.js';
import { hashPassword } from '../auth/password.js';
import { normalizeEmail } from '../auth/users.js';
import type { AppContext } from '../context.js';
import type { AppDb } from '../db/client.js';
import { accountLinks, sessions, users, type UserRow } from '../db/schema/index.js';
import { conflict, notFound } from '../http/http-error.js';
import type { Actor } from '../queue/actor.js';
import { writeAudit } from '../queue/write-audit.js';
import { newSecret, secretDigest } from '../tokens/token-secret.js';

const HOUR_MS = 3_600_000;
export const LINK_LIFETIME_MS = { invite: 7 * 24 * HOUR_MS, 'password-reset': 24 * HOUR_MS } as const;
export const LINK_PREFIX = 'nsl_';

export const toUserSummary = (r: UserRow): UserSummary => ({
  id: r.id,
  email: r.email,
  displayName: r.displayName,
  role: r.role,
  disabled: r.disabled,
  createdAt: r.createdAt.toISOString(),
});

const actorOf = (u: SessionUser): Actor => ({ kind: 'user', userId: u.id, role: u.role, email: u.email });

/**
 * Account administration: create or invite, change role, disable, reset password. The last
 * enabled administrator can be neither demoted nor disabled (the check runs in the same
 * transaction as the change, with the admin rows locked, so two admins demoting each other
 * at once cannot both win). Every change is audited with before and after.
 */
export class UserAdmin {
  constructor(private readonly ctx: AppContext) {}

  private get db(): AppDb {
    return this.ctx.db;
  }

  async list(): Promise<UserSummary[]> {
    return (await this.db.select().from(users).orderBy(asc(users.email))).map(toUserSummary);
  }

  async create(admin: SessionUser, req: CreateUserRequest): Promise<UserActionResponse> {
    const email = normalizeEmail(req.email);
    const [dup] = await this.db.select({ id: users.id }).from(users).where(eq(users.email, email));
    if (dup) throw conflict(`An account with the e-mail ${email} already exists (user ${dup.id}). Change that account instead.`);
    // An invited account gets a random password nobody knows until the link is used.
    const passwordHash = await hashPassword(req.password ?? crypto.randomBytes(32).toString('base64url'));
    const [row] = await this.db.insert(users).values({ email, displayName: req.displayName, role: req.role, passwordHash }).returning();
    await writeAudit(this.db, {
      actor: actorOf(admin),
      action: req.password ? 'user.create' : 'user.invite',
      target: `user:${row.id}`,
      after: { email, displayName: row.displayName, role: row.role },
    });
    if (req.password) return { user: toUserSummary(row) };
    return { user: toUserSummary(row), ...(await this.mailLink(admin, row, 'invite')) };
  }

  async update(admin: SessionUser, id: number, patch: UpdateUserRequest): Promise<UserSummary> {
    const { before, after } = await this.db.transaction(async (tx) => {
      const [target] = await tx.select().from(users).where(eq(users.id, id)).for('update');
      if (!target) throw notFound(`There is no user ${id}. Reload the account list.`);
      const losesAdmin = target.role === 'admin' && !target.disabled && ((patch.role !== undefined && patch.role !== 'admin') || patch.disabled === true);
      if (losesAdmin) {
        const others = await tx
          .select({ id: users.id })
          .from(users)
          .where(and(eq(users.role, 'admin'), eq(users.disabled, false), ne(users.id, id)))
          .for('update');
        if (others.length === 0) {
          throw conflict(
            `${target.email} is the last enabled administrator, so it cannot be ${patch.disabled ? 'disabled' : 'given another role'}. Make another account an administrator first.`,
          );
        }
      }
      const [updated] = await tx
        .update(users)
        .set({ ...patch, updatedAt: new Date() })
        .where(eq(users.id, id))
        .returning();
      return { before: target, after: updated };
    });
    const actor = actorOf(admin);
    if (patch.role !== undefined && patch.role !== before.role) {
      await writeAudit(this.db, { actor, action: 'user.role', target: `user:${id}`, before: { role: before.role }, after: { role: after.role } });
    }
    if (patch.disabled !== undefined && patch.disabled !== before.disabled) {
      await writeAudit(this.db, { actor, action: patch.disabled ? 'user.disable' : 'user.enable', target: `user:${id}`, before: { disabled: before.disabled }, after: { disabled: after.disabled } });
      if (patch.disabled) await this.endSessions(id);
    }
    if (patch.displayName !== undefined && patch.displayName !== before.displayName) {
      await writeAudit(this.db, { actor, action: 'user.rename', target: `user:${id}`, before: { displayName: before.displayName }, after: { displayName: after.displayName } });
    }
    return toUserSummary(after);
  }

  /** Sets a password now, or mails a one-time link. Either way the person's sessions end. */
  async resetPassword(admin: SessionUser, id: number, password: string | undefined): Promise<UserActionResponse> {
    const [target] = await this.db.select().from(users).where(eq(users.id, id));
    if (!target) throw notFound(`There is no user ${id}. Reload the account list.`);
    await this.endSessions(id);
    if (password) {
      await this.db.update(users).set({ passwordHash: await hashPassword(password), updatedAt: new Date() }).where(eq(users.id, id));
      await writeAudit(this.db, { actor: actorOf(admin), action: 'user.password-set', target: `user:${id}` });
      return { user: toUserSummary(target) };
    }
    await writeAudit(this.db, { actor: actorOf(admin), action: 'user.password-reset', target: `user:${id}` });
    return { user: toUserSummary(target), ...(await this.mailLink(admin, target, 'password-reset')) };
  }

  private async endSessions(userId: number): Promise<void> {
    await this.db.delete(sessions).where(sql`(${sessions.data} -> 'passport' ->> 'user') = ${String(userId)}`);
  }

  /** Makes a one-time link (older unused links of the same person and purpose stop working) and mails it. */
  private async mailLink(admin: SessionUser, target: UserRow, purpose: 'invite' | 'password-reset'): Promise<{ link: string; mailed: boolean }> {
    const secret = newSecret(LINK_PREFIX);
    const now = Date.now();
    await this.db
      .update(accountLinks)
      .set({ usedAt: new Date(now) })
      .where(and(eq(accountLinks.userId, target.id), eq(accountLinks.purpose, purpose), isNull(accountLinks.usedAt)));
    const expiresAt = new Date(now + LINK_LIFETIME_MS[purpose]);
    await this.db.insert(accountLinks).values({ userId: target.id, purpose, secretSha256: secretDigest(secret), createdBy: admin.id, expiresAt });
    const mail = this.ctx.services.mail;
    const base = mail?.config.publicUrl ?? `http://${this.ctx.config.host}:${this.ctx.config.port}`;
    const link = `${base}/set-password/${secret}`;
    if (!mail) return { link, mailed: false };
    const invite = purpose === 'invite';
    const outcome = await mail.mailer.send({
      kind: purpose,
      to: [target.email],
      subject: invite ? '[Nullsmith] You are invited to Nullsmith' : '[Nullsmith] Set a new password',
      text: [
        `Hello ${target.displayName},`,
        '',
        invite
          ? `${admin.displayName} made you a Nullsmith account (${target.email}, role ${target.role}).`
          : `${admin.displayName} reset the password of your Nullsmith account (${target.email}).`,
        'Open this link to choose your password. It works once, until',
        `${expiresAt.toISOString()}:`,
        '',
        `  ${link}`,
        '',
        'If you did not expect this message, ignore it: nothing changes until the link is used.',
      ].join('\n'),
      ref: `user:${target.id}`,
    });
    return { link, mailed: outcome?.state === 'sent' };
  }
}
