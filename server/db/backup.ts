import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import zlib from 'node:zlib';
import { PGlite } from '@electric-sql/pglite';
import { folderHolder, lockDataFolder } from './folder-lock.js';
import { snapshotThroughServer } from './backup-socket.js';

/**
 * Backups: the embedded database's data folder as a gzipped tarball (PGlite's own dump), or
 * `pg_dump --format=custom` when a PostgreSQL server is used. Restore puts either back.
 */
export async function backupPglite(dataDir: string, file: string): Promise<'offline' | 'through the running server'> {
  if (!fs.existsSync(dataDir)) throw new Error(`No embedded database at ${dataDir}`);
  // A running server holds the folder: it takes the snapshot itself, consistently, and sends it.
  const holder = folderHolder(dataDir);
  if (holder?.backupSocket) {
    await snapshotThroughServer(holder.backupSocket, file);
    return 'through the running server';
  }
  const lock = lockDataFolder(dataDir, 'backup'); // refused (naming the holder) when another command has it
  try {
    const db = new PGlite(dataDir);
    try {
      // dumpDataDir never settles when called before the database is ready.
      await db.waitReady;
      const blob = await db.dumpDataDir('gzip');
      const tmp = `${file}.partial`;
      fs.writeFileSync(tmp, Buffer.from(await blob.arrayBuffer()));
      fs.renameSync(tmp, file);
    } finally {
      await db.close();
    }
  } finally {
    lock.release();
  }
  return 'offline';
}

/**
 * Checks that `bytes` is a whole gzipped tar of a PGlite data folder before anything is touched;
 * throws one plain sentence naming the file otherwise.
 */
export function checkBackupFile(file: string, bytes: Uint8Array) {
  let tar: Buffer;
  try {
    tar = zlib.gunzipSync(bytes);
  } catch (err) {
    const why = (err as NodeJS.ErrnoException).code === 'Z_BUF_ERROR' ? 'it is cut short' : 'it is not a gzip file or is damaged';
    throw new Error(`${file} is not a usable Netput backup: ${why}. Nothing was changed.`);
  }
  // A tar archive: "ustar" at byte 257 of its first header, and a PG_VERSION file somewhere in it.
  if (tar.length < 512 || tar.subarray(257, 262).toString('latin1') !== 'ustar' || !tar.includes(Buffer.from('PG_VERSION'))) {
    throw new Error(`${file} is not a usable Netput backup: it holds no embedded database folder. Nothing was changed.`);
  }
}

/** Restores into `dataDir`; an existing folder is kept beside it as `<dataDir>.before-restore-<time>`. */
export async function restorePglite(file: string, dataDir: string): Promise<string | null> {
  let bytes: Uint8Array<ArrayBuffer>;
  try {
    bytes = fs.readFileSync(file);
  } catch (err) {
    throw new Error(`${file} cannot be read: ${(err as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (err as Error).message}`);
  }
  checkBackupFile(file, bytes);
  // Refused, naming the process, while a server or another command has the folder open.
  const lock = lockDataFolder(dataDir, 'restore');
  try {
    return await restoreLocked(bytes, dataDir);
  } finally {
    lock.release();
  }
}

async function restoreLocked(bytes: Uint8Array<ArrayBuffer>, dataDir: string): Promise<string | null> {
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
    throw new Error(`The backup could not be restored (the database was left as it was): ${firstLine(err)}`);
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

function firstLine(err: unknown): string {
  return String((err as Error)?.message ?? err).split('\n')[0]!;
}
