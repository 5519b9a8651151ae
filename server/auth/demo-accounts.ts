import type { Role } from '../../shared/roles.js';
import type { AppDb } from '../db/client.js';
import { users } from '../db/schema/index.js';
import type { Logger } from '../logger.js';
import { hashPassword } from './password.js';
import { countUsers } from './users.js';

/** Invented demo accounts, one per role. README warns to change or disable them. */
export const DEMO_ACCOUNTS: readonly { email: string; password: string; role: Role; displayName: string }[] = [
  { email: 'admin@demo.nullsmith', password: 'nullsmith-admin', role: 'admin', displayName: 'Demo administrator' },
  { email: 'ops@demo.nullsmith', password: 'nullsmith-ops', role: 'operations', displayName: 'Demo operations' },
  { email: 'analyst@demo.nullsmith', password: 'nullsmith-analyst', role: 'analyst', displayName: 'Demo analyst' },
];

/** Creates the demo accounts only on a database with no users at all (a fresh install). */
export async function seedDemoAccounts(db: AppDb, logger: Logger): Promise<boolean> {
  if ((await countUsers(db)) > 0) return false;
  const rows = await Promise.all(
    DEMO_ACCOUNTS.map(async (a) => ({ email: a.email, displayName: a.displayName, role: a.role, passwordHash: await hashPassword(a.password) })),
  );
  await db.insert(users).values(rows).onConflictDoNothing();
  logger.warn('created the demo accounts (admin@, ops@, analyst@demo.nullsmith): change their passwords or disable them before real use');
  return true;
}
