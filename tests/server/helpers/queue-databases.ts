/**
 * Databases for the queue suites: always an in-memory PGlite; also a real PostgreSQL when
 * TEST_DATABASE_URL is set (CI starts one). Each PostgreSQL handle gets its own throw-away
 * database (`CREATE DATABASE nullsmith_test_<random>`), dropped at close, so suites never see
 * each other's rows.
 */
import crypto from 'node:crypto';
import { sql } from 'drizzle-orm';
import { openDatabase, type DatabaseHandle } from '../../../server/db/client.js';
import { users } from '../../../server/db/schema/users.js';

export type DbMode = 'pglite' | 'postgres';

export const dbModes = (): DbMode[] => (process.env.TEST_DATABASE_URL ? ['pglite', 'postgres'] : ['pglite']);

export interface TestDatabase extends DatabaseHandle {
  /** postgres:// URL of the throw-away database (postgres mode only), for child processes. */
  url?: string;
}

export async function createTestDatabaseUrl(): Promise<{ url: string; drop: () => Promise<void> }> {
  const admin = process.env.TEST_DATABASE_URL;
  if (!admin) throw new Error('TEST_DATABASE_URL is not set; start a PostgreSQL server and point it there.');
  const { default: pg } = await import('pg');
  const name = `nullsmith_test_${crypto.randomBytes(6).toString('hex')}`;
  const c = new pg.Client({ connectionString: admin });
  await c.connect();
  await c.query(`create database ${name}`);
  await c.end();
  const url = new URL(admin);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    drop: async () => {
      const d = new pg.Client({ connectionString: admin });
      await d.connect();
      await d.query(`drop database if exists ${name} with (force)`);
      await d.end();
    },
  };
}

export async function openTestDatabase(mode: DbMode): Promise<TestDatabase> {
  if (mode === 'pglite') return openDatabase({ dataDir: 'memory://' });
  const { url, drop } = await createTestDatabaseUrl();
  const handle = await openDatabase({ dataDir: 'memory://', databaseUrl: url });
  return {
    ...handle,
    url,
    close: async () => {
      await handle.close();
      await drop();
    },
  };
}

/** Inserts a user (jobs need an owner) and returns its id. */
export async function insertTestUser(h: DatabaseHandle, role: 'analyst' | 'operations' | 'admin' = 'analyst'): Promise<number> {
  const [u] = await h.db
    .insert(users)
    .values({ email: `${role}-${crypto.randomBytes(4).toString('hex')}@test.nullsmith`, displayName: `Test ${role}`, role, passwordHash: 'not-a-hash' })
    .returning({ id: users.id });
  return u.id;
}

/** Moves every timestamp of a job back by `ms`, to simulate the passing of time without sleeping. */
export async function ageJob(h: DatabaseHandle, jobId: number, column: 'lease_expires_at' | 'run_after', ms: number): Promise<void> {
  await h.db.execute(sql`update jobs set ${sql.raw(column)} = ${sql.raw(column)} - ${ms} * interval '1 millisecond' where id = ${jobId}`);
}
