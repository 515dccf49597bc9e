import { asc, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Database } from '../db/client.js';
import { openTestDatabase } from '../../tests/api/test-db.js';
import { deliveryPoints, items, priceObservations, seasons } from '../db/schema/index.js';
import type { PriceWrite } from './import-types.js';
import { arrayLiteral, ReferenceGoneError, writeRows } from './imports-repository.js';

let database: Database;
let ids: { item: number; season: number; dp: number };
beforeAll(async () => {
  // A fresh in-memory PGlite, or a database of its own on the PostgreSQL suite's server.
  database = await openTestDatabase();
  const db = database.db;
  const [item] = await db.insert(items).values({ code: 'wheat', name: 'Wheat', role: 'output', category: 'grain', unit: 't' }).returning();
  const [season] = await db.insert(seasons).values({ label: '2024/25', startYear: 2024, startMonth: 7, startsOn: '2024-07-01' }).returning();
  const [dp] = await db.insert(deliveryPoints).values({ name: 'Larkfield terminal', kind: 'delivery point', region: 'Riverlands' }).returning();
  ids = { item: item.id, season: season.id, dp: dp.id };
});
afterAll(async () => database.close());

// Text that array literals and CSV must carry unchanged (PostgreSQL manual: "Array Value Input",
// COPY "CSV Format").
const TRICKY = ['a "quoted" word', 'back\\slash', 'comma, {brace}', 'NULL', '', 'two\nlines', 'Café – Zürich', "'=1+1"];

const price = (k: number, source: string, price = 100 + k): PriceWrite => ({
  row: k + 2,
  itemId: ids.item,
  seasonId: ids.season,
  deliveryPointId: ids.dp,
  price,
  currency: 'EUR',
  source,
  observedOn: `2024-08-${String(k + 1).padStart(2, '0')}`,
});

async function stored() {
  return database.db.select({ source: priceObservations.source, price: priceObservations.price, on: priceObservations.observedOn }).from(priceObservations).orderBy(asc(priceObservations.observedOn));
}

describe('arrayLiteral', () => {
  it('quotes every text element and escapes quotes and backslashes', () => {
    expect(arrayLiteral(['a"b', 'c\\d', 'NULL'])).toBe('{"a\\"b","c\\\\d","NULL"}');
    expect(arrayLiteral([1, 0.1, 1e21])).toBe('{1,0.1,1e+21}');
  });
});

describe('writeRows', () => {
  const noProgress = () => {};
  const writeSet = (prices: PriceWrite[]) => ({ prices, records: [], factors: [], contracts: [] });

  it('inserts by COPY on PGlite and updates by INSERT … ON CONFLICT, carrying every character', async () => {
    const fresh = TRICKY.map((s, k) => price(k, s));
    const counts = await database.db.transaction((tx) => writeRows(tx, writeSet(fresh), 'update', noProgress, 'pglite'));
    expect(counts.prices).toEqual({ inserted: TRICKY.length, updated: 0, skipped: 0 });
    expect((await stored()).map((r) => r.source)).toEqual(TRICKY);
    const again = TRICKY.map((s, k) => price(k, [...s].reverse().join(''), 0.1 + k));
    const updated = await database.db.transaction((tx) => writeRows(tx, writeSet(again), 'update', noProgress, 'pglite'));
    expect(updated.prices).toEqual({ inserted: 0, updated: TRICKY.length, skipped: 0 });
    const rows = await stored();
    expect(rows.map((r) => r.source)).toEqual(TRICKY.map((s) => [...s].reverse().join('')));
    // Shortest round-trip decimal form in, the same double out.
    expect(rows.map((r) => r.price)).toEqual(TRICKY.map((_, k) => 0.1 + k));
  });

  it('inserts by unnest where COPY is not used, and skips existing keys when asked', async () => {
    const rows = [price(20, 'one "more"'), price(0, 'not written')];
    const counts = await database.db.transaction((tx) => writeRows(tx, writeSet(rows), 'skip', noProgress, 'postgres'));
    expect(counts.prices).toEqual({ inserted: 1, updated: 0, skipped: 1 });
    const all = await stored();
    expect(all.find((r) => r.on === '2024-08-21')!.source).toBe('one "more"');
    expect(all.find((r) => r.on === '2024-08-01')!.source).not.toBe('not written');
  });

  it('refuses rows whose item no longer exists, even with the foreign-key triggers skipped', async () => {
    const before = await stored();
    const bad = { ...price(25, 'x'), itemId: ids.item + 1000 };
    await expect(database.db.transaction((tx) => writeRows(tx, writeSet([bad]), 'update', noProgress, 'pglite'))).rejects.toBeInstanceOf(ReferenceGoneError);
    expect(await stored()).toEqual(before);
    // The triggers come back for the rest of the transaction.
    const role = (await database.db.execute(sql`show session_replication_role`)) as unknown as { rows: { session_replication_role: string }[] };
    expect(role.rows[0].session_replication_role).toBe('origin');
  });
});
