import { eq, lt, sql } from 'drizzle-orm';
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import type { Db } from '../db/client.js';
import { rateLimitHits } from '../db/schema/index.js';

/**
 * An express-rate-limit store in the database, so that every app instance counts the same sign-in
 * attempts. One upsert per hit: a window that has ended starts again at 1.
 */
export class DatabaseRateLimitStore implements Store {
  private windowMs = 60_000;
  readonly localKeys = false;

  constructor(
    private readonly db: Db,
    readonly prefix: string,
  ) {}

  init(options: Options) {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const [row] = await this.db.select().from(rateLimitHits).where(eq(rateLimitHits.key, this.prefix + key));
    if (!row || row.resetAt.getTime() <= Date.now()) return undefined;
    return { totalHits: row.hits, resetTime: row.resetAt };
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const resetAt = new Date(Date.now() + this.windowMs);
    const [row] = await this.db
      .insert(rateLimitHits)
      .values({ key: this.prefix + key, hits: 1, resetAt })
      .onConflictDoUpdate({
        target: rateLimitHits.key,
        set: {
          hits: sql`case when ${rateLimitHits.resetAt} <= now() then 1 else ${rateLimitHits.hits} + 1 end`,
          resetAt: sql`case when ${rateLimitHits.resetAt} <= now() then ${resetAt.toISOString()}::timestamptz else ${rateLimitHits.resetAt} end`,
        },
      })
      .returning();
    return { totalHits: row.hits, resetTime: row.resetAt };
  }

  async decrement(key: string) {
    await this.db
      .update(rateLimitHits)
      .set({ hits: sql`greatest(${rateLimitHits.hits} - 1, 0)` })
      .where(eq(rateLimitHits.key, this.prefix + key));
  }

  async resetKey(key: string) {
    await this.db.delete(rateLimitHits).where(eq(rateLimitHits.key, this.prefix + key));
  }

  /** Drops counters whose window has ended. */
  async purge() {
    await this.db.delete(rateLimitHits).where(lt(rateLimitHits.resetAt, new Date()));
  }
}
