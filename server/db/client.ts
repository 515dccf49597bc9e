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
import { ChangeTracker, classify } from './change-tracker.js';
import { lockDataFolder, type FolderLock } from './folder-lock.js';

export type Schema = typeof schema;
/** The one database type the rest of the server sees: PGlite or a PostgreSQL server behind it. */
export type Db = PgDatabase<PgQueryResultHKT, Schema>;

export interface Database {
  db: Db;
  kind: 'pglite' | 'postgres';
  /** Writes seen by this process (PGlite only: a PostgreSQL server has other writers). */
  changes: ChangeTracker | null;
  close(): Promise<void>;
  /** The data folder's lock (PGlite on a folder only): one process per folder. */
  lock?: FolderLock;
  /**
   * PGlite only: the data folder as a gzipped tarball, taken while no transaction is open (other
   * transactions wait for it) right after a checkpoint, so it restores to exactly the committed rows.
   */
  snapshot?: () => Promise<Blob>;
}

export const MIGRATIONS_DIR = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations');

export interface OpenOptions {
  /** A postgres:// URL: use a PostgreSQL server through node-postgres. */
  databaseUrl?: string;
  /** Folder for PGlite's data; `memory://` (or undefined with no URL) keeps it in memory. */
  dataDir?: string;
  /** What this process is, for the data folder's lock (`server`, `seed`, …); named to a second opener. */
  purpose?: string;
  /**
   * Runs once the migrations are applied, before any other instance starting at the same time gets
   * past its own migrations (on a PostgreSQL server, under the same advisory lock): e.g. loading the
   * demo co-op into an empty database.
   */
  setup?: (db: Db) => Promise<void>;
}

/** The advisory lock key that serialises migrations (and `setup`) across instances on one server. */
export const MIGRATION_LOCK_KEY = 0x4e50_4d49_4752n; // "NPMIGR"

/**
 * PGlite runs PostgreSQL inside the server's own process, so its buffer cache is the server's
 * memory. PostgreSQL's default 128 MB of shared buffers made a freshly opened data folder hold
 * about 290 MB of resident memory; 32 MB keeps a co-op's working set (a few hundred thousand
 * price and record rows) cached at about 130 MB less. NETPUT_PGLITE_SHARED_BUFFERS overrides it.
 */
const PGLITE_OPTIONS = { postgresqlconf: `shared_buffers=${process.env.NETPUT_PGLITE_SHARED_BUFFERS ?? '32MB'}` };

/** Opens the database and applies the committed migrations (idempotent). */
export async function openDatabase(options: OpenOptions): Promise<Database> {
  if (options.databaseUrl) {
    const pool = new pg.Pool({ connectionString: options.databaseUrl, max: 10 });
    // An idle client cut off by the server (restart, dropped database) must not crash the process.
    pool.on('error', () => {});
    const db = drizzlePg(pool, { schema }) as unknown as Db;
    try {
      // Two instances starting together on an empty database would both apply the migrations (and
      // one die on the other's tables): a session-level advisory lock on one connection serialises them.
      const conn = await pool.connect();
      try {
        await conn.query('select pg_advisory_lock($1)', [MIGRATION_LOCK_KEY.toString()]);
        try {
          await migratePg(drizzlePg(conn), { migrationsFolder: MIGRATIONS_DIR });
          await options.setup?.(db);
        } finally {
          await conn.query('select pg_advisory_unlock($1)', [MIGRATION_LOCK_KEY.toString()]);
        }
      } finally {
        conn.release();
      }
    } catch (err) {
      await pool.end().catch(() => {});
      throw err;
    }
    return { db, kind: 'postgres', changes: null, close: () => pool.end() };
  }
  let client: PGlite;
  let lock: FolderLock | undefined;
  if (!options.dataDir || options.dataDir.startsWith('memory://')) {
    client = new PGlite(PGLITE_OPTIONS);
  } else {
    // One process per data folder: refused here, before PGlite touches the folder.
    lock = lockDataFolder(options.dataDir, options.purpose ?? 'a Netput command');
    // PGlite creates its folder with a non-recursive mkdir.
    fs.mkdirSync(path.dirname(path.resolve(options.dataDir)), { recursive: true });
    client = new PGlite(options.dataDir, PGLITE_OPTIONS);
  }
  try {
    await client.waitReady;
  } catch (err) {
    lock?.release();
    throw err;
  }
  const changes = new ChangeTracker();
  watchWrites(client, changes);
  const db = drizzlePglite(client, { schema }) as unknown as Db;
  try {
    await migratePglite(drizzlePglite(client), { migrationsFolder: MIGRATIONS_DIR });
    await options.setup?.(db);
  } catch (err) {
    await client.close().catch(() => {});
    lock?.release();
    throw err;
  }
  return {
    db,
    kind: 'pglite',
    changes,
    lock,
    snapshot: () =>
      client.transaction(async (tx) => {
        await tx.exec('checkpoint');
        return client.dumpDataDir('gzip');
      }),
    close: async () => {
      try {
        await client.close();
      } finally {
        lock?.release();
      }
    },
  };
}

type Queryable = Pick<PGlite, 'query' | 'exec'>;

/**
 * A turn of the event loop before each PGlite statement. PGlite answers as promises that settle as
 * microtasks, so statements queued by several requests at once would otherwise run back to back
 * without the server ever reading its sockets: five readers could hold `/api/health` for the time
 * of all their statements together (issue 15 item 10). With this turn an incoming request waits at
 * most for the one statement running.
 */
const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Feeds every statement run through the PGlite client (and through its transactions) to the
 * change tracker, each after a turn of the event loop (nextTurn). A write is stamped when it is sent and again when it has finished; writes made
 * in a transaction are stamped once more when the transaction ends, when they become visible.
 */
function watchWrites(client: PGlite, changes: ChangeTracker): void {
  const wrap = (target: Queryable, written: Set<string> | null) => {
    const query = target.query.bind(target);
    const exec = target.exec.bind(target);
    const note = (sql: string) => {
      changes.observe(sql);
      if (written) written.add(sql);
    };
    target.query = (async (sql: string, params?: unknown[], options?: unknown) => {
      await nextTurn();
      note(sql);
      try {
        return await query(sql, params as never, options as never);
      } finally {
        if (!written) changes.observe(sql);
      }
    }) as PGlite['query'];
    target.exec = (async (sql: string, options?: unknown) => {
      await nextTurn();
      note(sql);
      try {
        return await exec(sql, options as never);
      } finally {
        if (!written) changes.observe(sql);
      }
    }) as PGlite['exec'];
  };
  wrap(client, null);
  const transaction = client.transaction.bind(client);
  client.transaction = (async (fn: (tx: Parameters<Parameters<PGlite['transaction']>[0]>[0]) => Promise<unknown>) => {
    const statements = new Set<string>();
    try {
      return await transaction(async (tx) => {
        wrap(tx, statements);
        return fn(tx);
      });
    } finally {
      for (const sql of statements) if (classify(sql).write !== 'none') changes.observe(sql);
    }
  }) as PGlite['transaction'];
}
