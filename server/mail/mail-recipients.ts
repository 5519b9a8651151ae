import { and, eq } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { users } from '../db/schema/index.js';

/** Addresses of every enabled operations account, plus MAIL_OPERATIONS_TO. */
export async function operationsAddresses(db: AppDb, extra: string[]): Promise<string[]> {
  const rows = await db.select({ email: users.email }).from(users).where(and(eq(users.role, 'operations'), eq(users.disabled, false)));
  return uniqueAddresses([...rows.map((r) => r.email), ...extra]);
}

export function uniqueAddresses(list: string[]): string[] {
  const seen = new Set<string>();
  return list.filter((a) => {
    const k = a.trim().toLowerCase();
    if (!k || seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}
