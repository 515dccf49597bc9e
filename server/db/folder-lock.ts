import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { isGone, SELF, type ProcessIdentity } from '../core/process-identity.js';

/**
 * One process per embedded data folder. PGlite has no lock of its own: two processes on one folder
 * both start, both write, and the folder ends up losing confirmed writes or not opening at all.
 *
 * The lock is a folder `<dataDir>.lock/` beside the data folder holding numbered claims
 * (`000001.json`, `000002.json`, …). The claim with the highest number is the lock; it names its
 * process (host, pid, start time, command, since when). To take the lock a process reads the
 * highest claim: when its process still runs the folder is in use and the taker is refused; when it
 * is gone (verified against /proc: no such pid, or a pid reused by a later process) or there is no
 * claim, the taker writes its claim under the next number with `link()`, which fails when that
 * number exists, so of two starters racing for one stale lock exactly one gets it. The winner then
 * checks that no higher claim appeared meanwhile (a starter that read the folder long before could
 * otherwise win a number already superseded) and removes the claims below its own.
 */

export interface LockHolder extends ProcessIdentity {
  command: string;
  since: string;
  /** The server's local socket for live backups (`npm run backup` while it runs). */
  backupSocket?: string;
}

export class FolderInUseError extends Error {
  constructor(
    readonly folder: string,
    readonly holder: LockHolder,
  ) {
    super(
      `The data folder ${folder} is in use by another Netput process: pid ${holder.pid}${holder.host !== SELF.host ? ` on ${holder.host}` : ''} (${holder.command}), since ${holder.since.replace('T', ' ').slice(0, 19)} UTC. ` +
        `Stop it first${holder.host !== SELF.host ? `; if it is gone, delete ${folder}.lock` : ''}.`,
    );
    this.name = 'FolderInUseError';
  }
}

export interface FolderLock {
  readonly folder: string;
  /** The lock folder (`<folder>.lock`). */
  readonly dir: string;
  readonly holder: LockHolder;
  /** Adds facts to this process's claim (e.g. the backup socket once it listens). */
  update(extra: Partial<Pick<LockHolder, 'backupSocket'>>): void;
  release(): void;
}

const CLAIM = /^(\d{6,})\.json$/;

function claims(dir: string): number[] {
  let names: string[];
  try {
    names = fs.readdirSync(dir);
  } catch {
    return [];
  }
  return names
    .map((n) => CLAIM.exec(n)?.[1])
    .filter((n): n is string => !!n)
    .map(Number)
    .sort((a, b) => a - b);
}

const claimPath = (dir: string, n: number) => path.join(dir, `${String(n).padStart(6, '0')}.json`);

function readClaim(dir: string, n: number): LockHolder | null | 'vanished' {
  try {
    return JSON.parse(fs.readFileSync(claimPath(dir, n), 'utf8')) as LockHolder;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return 'vanished';
    return null; // unreadable: treated as a claim whose process is gone
  }
}

function defaultCommand(): string {
  const script = process.argv[1] ? path.relative(process.cwd(), process.argv[1]) : 'node';
  return [script, ...process.argv.slice(2)].join(' ');
}

/**
 * Takes the lock of `folder` (a PGlite data folder) for this process, or throws FolderInUseError
 * naming the process that holds it. `purpose` says what this process is (server, seed, backup…).
 */
export function lockDataFolder(folder: string, purpose: string): FolderLock {
  const abs = path.resolve(folder);
  const dir = `${abs}.lock`;
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  const me: LockHolder = { ...SELF, command: `${purpose}: ${defaultCommand()}`, since: new Date().toISOString() };
  for (let attempt = 0; attempt < 20; attempt++) {
    const all = claims(dir);
    const top = all.at(-1) ?? 0;
    if (top) {
      const holder = readClaim(dir, top);
      if (holder === 'vanished') continue;
      if (holder && !isGone(holder)) throw new FolderInUseError(abs, holder);
    }
    const mine = top + 1;
    const tmp = path.join(dir, `.${SELF.pid}-${process.hrtime.bigint()}.tmp`);
    fs.writeFileSync(tmp, JSON.stringify(me));
    try {
      fs.linkSync(tmp, claimPath(dir, mine));
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EEXIST') continue; // another starter took this number: look again
      throw err;
    } finally {
      fs.rmSync(tmp, { force: true });
    }
    if ((claims(dir).at(-1) ?? 0) > mine) {
      fs.rmSync(claimPath(dir, mine), { force: true });
      continue;
    }
    for (const n of all) {
      // A dead server's backup socket folder (it could not remove it itself) goes with its claim.
      const dead = readClaim(dir, n);
      if (dead && dead !== 'vanished' && dead.backupSocket) removeDeadSocket(dead.backupSocket, dir);
      fs.rmSync(claimPath(dir, n), { force: true });
    }
    return makeLock(abs, dir, mine, me);
  }
  throw new Error(`Could not take the lock of ${abs}: its lock folder ${dir} keeps changing`);
}

function removeDeadSocket(socket: string, lockDir: string) {
  const folder = path.dirname(socket);
  if (folder === lockDir) fs.rmSync(socket, { force: true });
  else if (path.dirname(folder) === path.resolve(os.tmpdir()) && path.basename(folder).startsWith('netput-backup-')) fs.rmSync(folder, { recursive: true, force: true });
}

function makeLock(folder: string, dir: string, n: number, holder: LockHolder): FolderLock {
  let released = false;
  const file = claimPath(dir, n);
  const onExit = () => release();
  function release() {
    if (released) return;
    released = true;
    process.off('exit', onExit);
    try {
      const now = JSON.parse(fs.readFileSync(file, 'utf8')) as LockHolder;
      if (now.pid === holder.pid && now.start === holder.start) fs.rmSync(file, { force: true });
    } catch {
      /* already gone */
    }
  }
  process.on('exit', onExit);
  return {
    folder,
    dir,
    holder,
    update(extra) {
      Object.assign(holder, extra);
      const tmp = path.join(dir, `.${SELF.pid}-${process.hrtime.bigint()}.tmp`);
      fs.writeFileSync(tmp, JSON.stringify(holder));
      fs.renameSync(tmp, file);
    },
    release,
  };
}

/** The process holding `folder`'s lock, if a live one does (for `npm run backup` to find the server). */
export function folderHolder(folder: string): LockHolder | null {
  const dir = `${path.resolve(folder)}.lock`;
  for (let attempt = 0; attempt < 5; attempt++) {
    const top = claims(dir).at(-1);
    if (!top) return null;
    const holder = readClaim(dir, top);
    if (holder === 'vanished') continue;
    return holder && !isGone(holder) ? holder : null;
  }
  return null;
}
