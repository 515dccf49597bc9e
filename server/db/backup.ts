import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { PGlite } from '@electric-sql/pglite';

/**
 * Backups: the embedded database's data folder as a gzipped tarball (PGlite's own dump), or
 * `pg_dump --format=custom` when a PostgreSQL server is used. Restore puts either back.
 */
export async function backupPglite(dataDir: string, file: string) {
  if (!fs.existsSync(dataDir)) throw new Error(`No embedded database at ${dataDir}`);
  const db = new PGlite(dataDir);
  try {
    // dumpDataDir never settles when called before the database is ready.
    await db.waitReady;
    const blob = await db.dumpDataDir('gzip');
    fs.writeFileSync(file, Buffer.from(await blob.arrayBuffer()));
  } finally {
    await db.close();
  }
}

/** Restores into `dataDir`; an existing folder is kept beside it as `<dataDir>.before-restore-<time>`. */
export async function restorePglite(file: string, dataDir: string): Promise<string | null> {
  const bytes = fs.readFileSync(file);
  let kept: string | null = null;
  if (fs.existsSync(dataDir)) {
    kept = `${dataDir}.before-restore-${new Date().toISOString().replace(/[:.]/g, '-')}`;
    fs.renameSync(dataDir, kept);
  }
  fs.mkdirSync(path.dirname(dataDir), { recursive: true });
  try {
    const db = new PGlite(dataDir, { loadDataDir: new Blob([bytes]) });
    await db.waitReady;
    await db.query('select 1');
    await db.close();
  } catch (err) {
    fs.rmSync(dataDir, { recursive: true, force: true });
    if (kept) fs.renameSync(kept, dataDir);
    throw new Error(`The backup could not be restored (the database was left as it was): ${(err as Error).message}`);
  }
  return kept;
}

function run(cmd: string, args: string[]) {
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  if (r.error) throw new Error(`${cmd} could not be started: ${r.error.message}`);
  if (r.status !== 0) throw new Error(`${cmd} failed: ${r.stderr.trim().split('\n').slice(-3).join(' ')}`);
}

export function backupPostgres(databaseUrl: string, file: string) {
  run('pg_dump', ['--format=custom', '--no-owner', `--file=${file}`, databaseUrl]);
}

export function restorePostgres(file: string, databaseUrl: string) {
  run('pg_restore', ['--clean', '--if-exists', '--no-owner', '--single-transaction', `--dbname=${databaseUrl}`, file]);
}
