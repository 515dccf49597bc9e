import { AsyncLocalStorage } from 'node:async_hooks';

/**
 * Which tables have changed since when, for the in-memory caches of the PGlite mode (session
 * lookups and cached read answers). PGlite runs inside this one process, so every write passes
 * through this process's client and is seen here; with a PostgreSQL server other instances write
 * too, and the caches are off (no tracker).
 *
 * Every write statement stamps the tables it names with a fresh tick of one clock. DELETE and
 * TRUNCATE stamp everything (a foreign key may cascade or set null in other tables), as does any
 * statement that is neither a plain read, transaction control or a session setting, nor a
 * recognised INSERT/UPDATE/COPY (DDL, DO, …).
 * Reads made inside `recordReads` are collected by table name, so a cached answer knows exactly
 * which tables it came from without any route having to list them.
 */
export class ChangeTracker {
  private clock = 0;
  /** Tick of the last write to each table. */
  private readonly stamps = new Map<string, number>();
  /** Tick of the last write that may have touched any table. */
  private everything = 0;
  private readonly reads = new AsyncLocalStorage<Set<string>>();

  /** The current tick: a cache entry computed from now on is valid while nothing it read is stamped later. */
  now(): number {
    return this.clock;
  }

  /** Notes a statement run against the database (reads are collected, writes stamp their tables). */
  observe(sql: string): void {
    const kind = classify(sql);
    if (kind.write === 'none') {
      const set = this.reads.getStore();
      if (set) for (const t of kind.tables) set.add(t);
      return;
    }
    this.clock++;
    if (kind.write === 'all') this.everything = this.clock;
    else for (const t of kind.tables) this.stamps.set(t, this.clock);
  }

  /** Marks everything changed (a transaction ended, a restore, a test reset). */
  touchAll(): void {
    this.everything = ++this.clock;
  }

  /** True when no table in `tables` has been written after tick `since`. */
  unchangedSince(tables: Iterable<string>, since: number): boolean {
    if (this.everything > since) return false;
    for (const t of tables) if ((this.stamps.get(t) ?? 0) > since) return false;
    return true;
  }

  /** Runs `fn` collecting the tables its queries read (in its whole async continuation) into `tables`. */
  recordReads<T>(fn: () => T, tables: Set<string> = new Set<string>()): { tables: Set<string>; result: T } {
    const result = this.reads.run(tables, fn);
    return { tables, result };
  }
}

type Classified = { write: 'none' | 'tables' | 'all'; tables: string[] };

const IDENT = '"?([A-Za-z_][A-Za-z0-9_]*)"?(?:\\s*\\.\\s*"?([A-Za-z_][A-Za-z0-9_]*)"?)?';
const READ_REF = new RegExp(`\\b(?:from|join)\\s+${IDENT}`, 'gi');
const WRITE_REF = new RegExp(`\\b(?:insert\\s+into|update|copy)\\s+${IDENT}`, 'gi');

/** The table named by an identifier match: the second part of schema.table, else the first. */
const tableOf = (m: RegExpExecArray): string => (m[2] ?? m[1]!).toLowerCase();

/**
 * Classifies one SQL statement (as drizzle and our own sql`` calls write them). A statement that
 * only reads is `none`, with the tables after FROM and JOIN; INSERT, UPDATE and COPY (also inside
 * WITH) write the tables they name; anything else that changes data or schema is `all`.
 */
export function classify(sql: string): Classified {
  const head = sql.replace(/^(\s|--[^\n]*\n|\/\*[\s\S]*?\*\/)+/, '').slice(0, 12).toLowerCase();
  const first = /^[a-z]+/.exec(head)?.[0] ?? '';
  const body = stripLiterals(sql);
  if (first === 'select' || first === 'with' || first === 'values' || first === 'show' || first === 'explain') {
    // SELECT … FOR UPDATE locks rows but changes nothing.
    if (first !== 'with' || !/\b(insert\s+into|update\s+"?[a-z_]|delete\s+from|merge|truncate)\b/i.test(body.replace(/\bfor\s+(no\s+key\s+)?update\b/gi, ''))) return { write: 'none', tables: readTables(body) };
  }
  // Transaction control, session settings (SET, e.g. session_replication_role), locks and
  // statistics change no data.
  if (['begin', 'start', 'commit', 'end', 'rollback', 'savepoint', 'release', 'set', 'reset', 'lock', 'analyze', 'vacuum', 'discard'].includes(first)) return { write: 'none', tables: [] };
  if (/\b(delete|truncate|merge)\b/i.test(body)) return { write: 'all', tables: [] };
  if (first === 'insert' || first === 'update' || first === 'copy' || first === 'with') {
    const tables: string[] = [];
    for (const m of body.matchAll(WRITE_REF)) tables.push(tableOf(m));
    if (tables.length && !(first === 'copy' && /\bto\b/i.test(body) && !/\bfrom\b/i.test(body))) return { write: 'tables', tables };
    if (first === 'copy') return { write: 'none', tables: [] };
  }
  return { write: 'all', tables: [] };
}

function readTables(body: string): string[] {
  const out: string[] = [];
  for (const m of body.matchAll(READ_REF)) out.push(tableOf(m));
  return out;
}

/** The statement with string literals emptied, so a word inside a value cannot look like SQL. */
function stripLiterals(sql: string): string {
  return sql.replace(/'(?:[^']|'')*'/g, "''");
}
