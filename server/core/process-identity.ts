import fs from 'node:fs';
import { hostname } from 'node:os';

/**
 * Who a process is, precisely enough to tell later whether it still runs: host, pid, and the
 * process's start time as the kernel counts it (field 22 of /proc/<pid>/stat, clock ticks since
 * boot) together with the boot id. A pid alone is not enough: after a restart (in a container
 * above all) the new process often gets the same pid as the one that died.
 */
export interface ProcessIdentity {
  host: string;
  pid: number;
  /** `<boot id>/<start ticks>`, or '' where /proc is not available. */
  start: string;
}

function readBootId(): string {
  try {
    return fs.readFileSync('/proc/sys/kernel/random/boot_id', 'utf8').trim();
  } catch {
    return '';
  }
}

const BOOT_ID = readBootId();

/** The start of process `pid` as `<boot id>/<ticks>`; null when no such process runs; '' without /proc. */
export function processStart(pid: number): string | null {
  if (!BOOT_ID) {
    try {
      process.kill(pid, 0);
      return '';
    } catch (err) {
      return (err as NodeJS.ErrnoException).code === 'EPERM' ? '' : null;
    }
  }
  let stat: string;
  try {
    stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  } catch {
    return null;
  }
  // "pid (comm) state ppid …": comm may hold spaces and parentheses, so count from the last ')'.
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  const ticks = fields[19]; // field 22 overall; field 3 (state) is fields[0]
  if (!ticks || fields[0] === 'Z') return null; // a zombie has exited
  return `${BOOT_ID}/${ticks}`;
}

export const SELF: ProcessIdentity = { host: hostname(), pid: process.pid, start: processStart(process.pid) ?? '' };

/**
 * True only when the process is known to be gone: same host, and no process with that pid runs or
 * the one that does started at another time (the pid was reused). A process on another host, or
 * one this host cannot check, counts as alive.
 */
export function isGone(p: ProcessIdentity): boolean {
  if (p.host !== SELF.host) return false;
  if (p.pid === SELF.pid && p.start === SELF.start) return false;
  const now = processStart(p.pid);
  if (now === null) return true;
  if (!p.start || !now) return false;
  return now !== p.start;
}

/** `host:pid:start` (the start's '/' kept), the owner tag written into lease columns. */
export function ownerTag(p: ProcessIdentity = SELF): string {
  return `${p.host}:${p.pid}:${p.start}`;
}

/** Reads an owner tag (`host:pid:start`, or the older `host:pid[:suffix]`); null when it is not one. */
export function parseOwnerTag(tag: string): ProcessIdentity | null {
  const [host, pid, start] = tag.split(':');
  const n = Number(pid);
  if (!host || !Number.isInteger(n) || n <= 0) return null;
  return { host, pid: n, start: start && start.includes('/') ? start : '' };
}

/** A lease owner (`host:pid:start…`) that is known to have stopped: its leases can be taken at once. */
export function ownerIsGone(tag: string | null | undefined): boolean {
  if (!tag) return false;
  const p = parseOwnerTag(tag);
  if (!p) return false;
  if (tag === ownerTag()) return false;
  // An older tag without a start time whose pid is ours belongs to an earlier incarnation.
  if (!p.start && p.host === SELF.host && p.pid === SELF.pid) return true;
  return isGone(p);
}
