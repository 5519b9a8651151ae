import crypto from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { AppDb } from '../db/client.js';
import { settings } from '../db/schema/index.js';

const KEY = 'session_secret';

/**
 * SESSION_SECRET from the environment wins; otherwise a random secret is generated on first
 * start and kept in `settings`, so sessions stay valid across restarts and across nodes that
 * share one PostgreSQL. Insert-if-absent then read back: two nodes starting together agree.
 */
export async function ensureSessionSecret(db: AppDb, fromEnv: string | undefined): Promise<string> {
  if (fromEnv) return fromEnv;
  const generated = crypto.randomBytes(48).toString('base64url');
  await db.insert(settings).values({ key: KEY, value: generated }).onConflictDoNothing();
  const [row] = await db.select({ value: settings.value }).from(settings).where(eq(settings.key, KEY));
  if (typeof row?.value !== 'string') throw new Error('The stored session secret is missing or damaged; delete the settings row "session_secret" to regenerate it.');
  return row.value;
}
