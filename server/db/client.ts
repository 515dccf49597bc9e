import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { PGlite } from '@electric-sql/pglite';
import type { PgDatabase, PgQueryResultHKT } from 'drizzle-orm/pg-core';
import { drizzle as drizzlePglite } from 'drizzle-orm/pglite';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { drizzle as drizzlePg } from 'drizzle-orm/node-postgres';
import { migrate as migratePg } from 'drizzle-orm/node-postgres/migrator';
import pg from 'pg';
import * as schema from './schema/index.js';

export type Schema = typeof schema;
/** The one database type the rest of the server sees: PGlite or a PostgreSQL server behind it. */
export type Db = PgDatabase<PgQueryResultHKT, Schema>;

export interface Database {
  db: Db;
  kind: 'pglite' | 'postgres';
  close(): Promise<void>;
}

export const MIGRATIONS_DIR = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

export interface OpenOptions {
  /** A postgres:// URL: use a PostgreSQL server through node-postgres. */
  databaseUrl?: string;
  /** Folder for PGlite's data; `memory://` (or undefined with no URL) keeps it in memory. */
  dataDir?: string;
}

/**
 * PGlite runs PostgreSQL inside the server's own process, so its buffer cache is the server's
 * memory. PostgreSQL's default 128 MB of shared buffers made a freshly opened data folder hold
 * about 290 MB of resident memory; 32 MB keeps a co-op's working set (a few hundred thousand
 * price and record rows) cached at about 130 MB less. NETPUT_PGLITE_SHARED_BUFFERS overrides it.
 */
const PGLITE_OPTIONS = { postgresqlconf: process.env.NETPUT_PGLITE_CONF ?? `shared_buffers=${process.env.NETPUT_PGLITE_SHARED_BUFFERS ?? '32MB'}` };

/** Opens the database and applies the committed migrations (idempotent). */
export async function openDatabase(options: OpenOptions): Promise<Database> {
  if (options.databaseUrl) {
    const pool = new pg.Pool({ connectionString: options.databaseUrl, max: 10 });
    // An idle client cut off by the server (restart, dropped database) must not crash the process.
    pool.on('error', () => {});
    const db = drizzlePg(pool, { schema }) as unknown as Db;
    await migratePg(drizzlePg(pool), { migrationsFolder: MIGRATIONS_DIR });
    return { db, kind: 'postgres', close: () => pool.end() };
  }
  let client: PGlite;
  if (!options.dataDir || options.dataDir.startsWith('memory://')) {
    client = new PGlite(PGLITE_OPTIONS);
  } else {
    // PGlite creates its folder with a non-recursive mkdir.
    fs.mkdirSync(path.dirname(path.resolve(options.dataDir)), { recursive: true });
    client = new PGlite(options.dataDir, PGLITE_OPTIONS);
  }
  await client.waitReady;
  const db = drizzlePglite(client, { schema }) as unknown as Db;
  await migratePglite(drizzlePglite(client), { migrationsFolder: MIGRATIONS_DIR });
  return { db, kind: 'pglite', close: () => client.close() };
}
