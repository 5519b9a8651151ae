import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import * as schema from './schema/index.js';

/** The Drizzle database as every module sees it, whichever driver is underneath. */
export type AppDb = PgDatabase<PgQueryResultHKT, typeof schema>;

export interface DatabaseHandle {
  db: AppDb;
  /** 'pglite' for the embedded default, 'postgres' for a PostgreSQL server. */
  kind: 'pglite' | 'postgres';
  close(): Promise<void>;
}

export const MIGRATIONS_FOLDER = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../drizzle');

/**
 * The one seam that chooses the driver. With a postgres:// URL, node-postgres talks to a real
 * server (many nodes may connect); otherwise this process opens PGlite in `dataDir/db` and is
 * its only owner (never open one PGlite directory from two processes). `dataDir` 'memory://'
 * gives a throw-away in-memory database for tests. Migrations in drizzle/ are applied before
 * the handle is returned.
 */
export async function openDatabase(opts: { dataDir: string; databaseUrl?: string }): Promise<DatabaseHandle> {
  if (opts.databaseUrl) {
    const { default: pg } = await import('pg');
    const { drizzle } = await import('drizzle-orm/node-postgres');
    const { migrate } = await import('drizzle-orm/node-postgres/migrator');
    const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 10 });
    // An idle pooled connection that the server ends (restart, pg_terminate_backend, a dropped
    // database) emits 'error' on the pool; unhandled, that would crash the process. The pool
    // discards the broken client by itself and opens a new one on the next query.
    pool.on('error', (e) => console.warn(`PostgreSQL closed an idle connection: ${e.message}`));
    const db = drizzle(pool, { schema, casing: 'snake_case' });
    await migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
    return { db: db as unknown as AppDb, kind: 'postgres', close: () => pool.end() };
  }
  const { PGlite } = await import('@electric-sql/pglite');
  const { drizzle } = await import('drizzle-orm/pglite');
  const { migrate } = await import('drizzle-orm/pglite/migrator');
  let dataPath: string | undefined;
  if (opts.dataDir !== 'memory://') {
    dataPath = path.join(opts.dataDir, 'db');
    fs.mkdirSync(dataPath, { recursive: true });
  }
  const client = dataPath ? new PGlite(dataPath) : new PGlite();
  await client.waitReady;
  const db = drizzle(client, { schema, casing: 'snake_case' });
  await migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
  return { db: db as unknown as AppDb, kind: 'pglite', close: () => client.close() };
}
