import { eq, sql } from 'drizzle-orm';
import type { SessionUser } from '../../shared/api/auth.js';
import type { AppDb } from '../db/client.js';
import { users, type UserRow } from '../db/schema/index.js';

/** E-mail addresses are stored and compared lower-case and trimmed. */
export const normalizeEmail = (email: string): string => email.trim().toLowerCase();

export function toSessionUser(row: Pick<UserRow, 'id' | 'email' | 'displayName' | 'role'>): SessionUser {
  return { id: row.id, email: row.email, displayName: row.displayName, role: row.role };
}

export async function findUserByEmail(db: AppDb, email: string): Promise<UserRow | undefined> {
  const [row] = await db.select().from(users).where(eq(users.email, normalizeEmail(email)));
  return row;
}

/** The user behind a session, or undefined when the account was removed or disabled since. */
export async function findActiveUser(db: AppDb, id: number): Promise<SessionUser | undefined> {
  const [row] = await db.select().from(users).where(eq(users.id, id));
  return row && !row.disabled ? toSessionUser(row) : undefined;
}

export async function countUsers(db: AppDb): Promise<number> {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(users);
  return row?.n ?? 0;
}
