import type { RequestHandler, Response } from 'express';
import type { ChangeTracker } from '../db/change-tracker.js';

/** Answer headers a cached answer carries along (a paged list's total). */
const KEPT_HEADERS = ['x-total-count'];

interface Entry {
  body: string;
  headers: [string, string][];
  /** Tables the answer was read from. */
  tables: Set<string>;
  /** Tracker tick when the answer started being computed. */
  since: number;
  storedAt: number;
}

const MAX_ENTRIES = 2000;
/** An answer larger than this is not kept (the price list of a big co-op, say). */
const MAX_BODY_CHARS = 2_000_000;
/** A safety net only: entries are dropped as soon as a table they were read from is written. */
const MAX_AGE_MS = 10 * 60_000;

/**
 * Answers of read routes kept in memory per user and URL, valid until any table the answer was
 * read from is written (ChangeTracker). Only routes whose answer depends on nothing but the
 * database, the user and the URL opt in (`cache: true` on the route). Without a tracker (a
 * PostgreSQL server, written to by other instances too) nothing is cached.
 */
export class ReadCache {
  private readonly entries = new Map<string, Entry>();
  hits = 0;
  misses = 0;

  constructor(private readonly changes: ChangeTracker) {}

  middleware(): RequestHandler {
    return (req, res, next) => {
      if (req.method !== 'GET' || !req.user) return next();
      // Role and farm are part of the key: an answer may depend on them, and they can change.
      const key = `${req.user.id}\u0000${req.user.role}\u0000${req.user.farmId}\u0000${req.originalUrl}`;
      const hit = this.entries.get(key);
      if (hit && Date.now() - hit.storedAt < MAX_AGE_MS && this.changes.unchangedSince(hit.tables, hit.since)) {
        this.hits++;
        // Most recently used last, so the oldest is dropped first.
        this.entries.delete(key);
        this.entries.set(key, hit);
        for (const [name, value] of hit.headers) res.setHeader(name, value);
        res.type('application/json').send(hit.body);
        return;
      }
      if (hit) this.entries.delete(key);
      this.misses++;
      const since = this.changes.now();
      // Filled while the handler runs; the handler may answer before its first await.
      const tables = new Set<string>();
      this.capture(res, (body) => {
        if (body.length > MAX_BODY_CHARS || !this.changes.unchangedSince(tables, since)) return;
        const headers = KEPT_HEADERS.flatMap((h): [string, string][] => (res.getHeader(h) === undefined ? [] : [[h, String(res.getHeader(h))]]));
        this.entries.set(key, { body, headers, tables, since, storedAt: Date.now() });
        if (this.entries.size > MAX_ENTRIES) this.entries.delete(this.entries.keys().next().value!);
      });
      this.changes.recordReads(() => next(), tables);
    };
  }

  /** Wraps res.json so a 200 answer is serialised once, sent, and handed to `keep`. */
  private capture(res: Response, keep: (body: string) => void) {
    res.json = (value: unknown) => {
      const body = JSON.stringify(value);
      if (res.statusCode === 200 && body !== undefined) keep(body);
      res.type('application/json');
      return res.send(body);
    };
  }

  clear() {
    this.entries.clear();
  }
}
