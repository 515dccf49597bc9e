import { describe, expect, it } from 'vitest';
import { ChangeTracker, classify } from './change-tracker.js';

// Statements in the form drizzle-orm writes them for PostgreSQL (quoted names, $n parameters), and our own raw SQL.
describe('classify', () => {
  it('reads name the tables after FROM and JOIN', () => {
    expect(
      classify('select "sessions"."last_seen_at", "users"."id" from "sessions" inner join "users" on "users"."id" = "sessions"."user_id" left join "farms" on "farms"."owner_user_id" = "users"."id" where "sessions"."id" = $1'),
    ).toEqual({ write: 'none', tables: ['sessions', 'users', 'farms'] });
    expect(classify('select count(*)::int as n from public.price_observations')).toEqual({ write: 'none', tables: ['price_observations'] });
    expect(classify('  -- a comment\nSELECT 1')).toEqual({ write: 'none', tables: [] });
  });

  it('locking reads change nothing', () => {
    expect(classify('select "id" from "jobs" where "status" = $1 order by "id" limit 1 for update skip locked').write).toBe('none');
    expect(classify('with next as (select id from jobs for update skip locked) select * from next').write).toBe('none');
  });

  it('INSERT, UPDATE and COPY … FROM stamp the table they write', () => {
    expect(classify('insert into "price_observations" ("item_id", "price") values ($1, $2) returning "id"')).toEqual({ write: 'tables', tables: ['price_observations'] });
    expect(classify('update "model_runs" set "progress" = $1 where "model_runs"."id" = $2')).toEqual({ write: 'tables', tables: ['model_runs'] });
    expect(classify("copy price_observations (item_id, price) from '/dev/blob' with (format csv)")).toEqual({ write: 'tables', tables: ['price_observations'] });
    expect(classify('with moved as (insert into "farm_records" select * from "staging" returning 1) select count(*) from moved').tables).toContain('farm_records');
  });

  it('a word inside a string literal is not a statement', () => {
    expect(classify("select * from \"audit_log\" where \"action\" = 'delete from users'")).toEqual({ write: 'none', tables: ['audit_log'] });
  });

  it('transaction control and session settings change no data', () => {
    expect(classify('set session_replication_role = replica').write).toBe('none');
    expect(classify('begin').write).toBe('none');
    expect(classify('lock table "imports" in exclusive mode').write).toBe('none');
  });

  it('DELETE, TRUNCATE and anything else stamp everything (cascades, DDL)', () => {
    expect(classify('delete from "farms" where "farms"."id" = $1').write).toBe('all');
    expect(classify('truncate table "prices"').write).toBe('all');
    expect(classify('alter table "farms" add column "x" int').write).toBe('all');
    expect(classify('with gone as (delete from "sessions" returning 1) select 1').write).toBe('all');
  });
});

describe('ChangeTracker', () => {
  it('an answer stays valid until a table it read is written', async () => {
    const t = new ChangeTracker();
    const since = t.now();
    const { tables } = t.recordReads(() => {
      t.observe('select * from "items"');
      t.observe('select * from "seasons" join "farms" on true');
    });
    expect([...tables].sort()).toEqual(['farms', 'items', 'seasons']);
    t.observe('update "users" set "name" = $1');
    expect(t.unchangedSince(tables, since)).toBe(true);
    t.observe('insert into "seasons" ("label") values ($1)');
    expect(t.unchangedSince(tables, since)).toBe(false);
    const later = t.now();
    expect(t.unchangedSince(tables, later)).toBe(true);
    t.observe('delete from "users"');
    expect(t.unchangedSince(tables, later)).toBe(false);
  });

  it('reads are collected across awaits, and only inside recordReads', async () => {
    const t = new ChangeTracker();
    t.observe('select * from "outside"');
    const { tables, result } = t.recordReads(async () => {
      await new Promise((r) => setTimeout(r, 5));
      t.observe('select * from "later"');
    });
    await result;
    expect([...tables]).toEqual(['later']);
  });
});
