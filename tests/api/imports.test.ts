import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { sql } from 'drizzle-orm';
import ExcelJS from 'exceljs';
import fc from 'fast-check';
import { DateTime } from 'luxon';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildDemoCoop } from '../../seed/demo-coop.js';
import { PRICE_COLUMNS, priceExportRows, RECORD_COLUMNS } from '../../server/exports/data-exports.js';
import { recordExportRows } from '../../server/records/records-repository.js';
import { toCsv, toXlsx } from '../../server/exports/spreadsheet-writers.js';
import { closeValidationPool } from '../../server/imports/validation-pool.js';
import { inflatingSheet, replaceParts } from '../fixtures/imports/zip-tools.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { commitImport, uploadImport } from './import-steps.js';

const fixtures = path.join(path.dirname(fileURLToPath(import.meta.url)), '../fixtures/imports');
const fixture = (name: string) => fs.readFileSync(path.join(fixtures, name));

let t: TestApp;
let planner: Awaited<ReturnType<typeof signedIn>>;
beforeAll(async () => {
  t = await startTestApp();
  planner = await signedIn(t.app, 'planner@example.org');
});
afterAll(async () => {
  await closeValidationPool();
  await t.close();
});

/** Commits as the planner and waits for the background work to end; answers the final GET. */
const commit = (id: number, onExisting: 'update' | 'skip', acceptWarnings = false) => commitImport(planner, id, onExisting, acceptWarnings);

async function rows(query: ReturnType<typeof sql>) {
  const res = (await t.database.db.execute(query)) as unknown as { rows: Record<string, unknown>[] };
  return res.rows;
}

/** Row counts of every table of the application. */
async function tableCounts(): Promise<Record<string, number>> {
  const tables = await rows(sql`select table_name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by table_name`);
  const out: Record<string, number> = {};
  for (const { table_name } of tables) {
    const [{ n }] = await rows(sql`select count(*)::int as n from ${sql.identifier(String(table_name))}`);
    out[String(table_name)] = Number(n);
  }
  return out;
}

async function priceOf(item: string, season: string, point: string, observedOn: string): Promise<number | null> {
  const r = await rows(sql`
    select p.price from price_observations p join items i on i.id = p.item_id join seasons s on s.id = p.season_id
    join delivery_points d on d.id = p.delivery_point_id
    where i.code = ${item} and s.label = ${season} and d.name = ${point} and p.observed_on = ${observedOn}`);
  return r.length ? Number(r[0].price) : null;
}

const demo = buildDemoCoop();
const demoPrice = (item: string, season: string, point: string, observedOn: string) =>
  demo.prices.find((p) => p.item === item && p.season === season && p.deliveryPoint === point && p.observedOn === observedOn)!.price;

describe('POST /api/imports (upload and preview)', () => {
  it('a messy CSV: the preview lists exactly the wrong rows, and the commit is refused', async () => {
    const res = await uploadImport(planner, 'prices', fixture('messy-prices.csv'), 'messy-prices.csv');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ kind: 'prices', fileName: 'messy-prices.csv', format: 'csv', status: 'validated', totalRows: 13, validRows: 4, errorCount: 9, errorsNotShown: 0 });
    expect(res.body.columns).toEqual(['Item', 'Season', 'Delivery point', 'Price', 'Unit', 'Currency', 'Source', 'Observed date', 'Notes']);
    expect(res.body.errors).toEqual([
      { row: 4, column: 'Price', message: '"12,5x" is not a number: it has the letter "x" in it' },
      { row: 5, column: 'Item', message: 'unknown item "barley" (items: wheat, canola, nitrogen, phosphate, potash, diesel, labour)' },
      { row: 6, column: 'Unit', message: 'unit "kg" is not nitrogen\'s unit "kg N"; nitrogen prices are per kg N' },
      { row: 8, column: 'Season', message: 'unknown season "2031/32" (seasons run from 2006/07 to 2026/27)' },
      { row: 9, column: 'Price', message: '"1 234,5" is written with a decimal comma (1234,5), but this co-op writes numbers with a decimal point (1234.5); it was not read (the decimal mark is a co-op setting, and an import can choose its own)' },
      { row: 10, column: 'Delivery point', message: 'unknown delivery point "Dover quay" (delivery points: Ashby elevator, Co-op input depot, Larkfield terminal, Millbrook store)' },
      { row: 11, column: 'Observed date', message: '"01/10/2024" is ambiguous (day/month or month/day?): write dates as YYYY-MM-DD' },
      { row: 12, column: null, message: 'the row repeats row 2 (same item, season, delivery point and observed date)' },
      { row: 13, column: 'Price', message: '"-0.9" is not a price: a price must be more than 0' },
    ]);
    // Of the four valid rows, labour at the input depot on 2024-10-01 is in the demo data already.
    expect(res.body.existingRows).toBe(1);
    expect(res.body.preview).toHaveLength(13);
    const refused = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'update' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe('The file has 9 error(s); fix them (or the column mapping) and validate again before committing');
  });

  it('the corrected file commits: new rows inserted, rows already there updated, one audit row', async () => {
    const before = await tableCounts();
    const res = await uploadImport(planner, 'prices', fixture('messy-prices-fixed.csv'), 'messy-prices-fixed.csv');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ errorCount: 0, totalRows: 12, validRows: 12, toWrite: { prices: 12, records: 0, factors: 0 }, existingRows: 5 });
    const done = await commit(res.body.id, 'update');
    expect(done.body).toMatchObject({ status: 'committed', counts: { inserted: 7, updated: 5, skipped: 0 }, progress: { done: 12, total: 12 }, failure: null });
    expect(await priceOf('nitrogen', '2024/25', 'Co-op input depot', '2024-10-01')).toBe(1.18);
    expect(await priceOf('canola', '2024/25', 'Larkfield terminal', '2024-09-02')).toBe(461.25);
    const after = await tableCounts();
    expect(after.price_observations - before.price_observations).toBe(7);
    // One entry for the import, and one compact entry in the prices' own change history.
    expect(after.audit_log - before.audit_log).toBe(2);
    const audit = await rows(sql`select action, entity, entity_id, after from audit_log order by id desc limit 2`);
    expect(audit[1]).toMatchObject({ action: 'import.commit', entity: 'import', entity_id: String(res.body.id) });
    expect((audit[1].after as { counts: unknown }).counts).toEqual({ inserted: 7, updated: 5, skipped: 0 });
    expect(audit[0]).toMatchObject({ action: 'price.import', entity: 'price', entity_id: `import ${res.body.id}` });
    expect(audit[0].after).toMatchObject({ import: res.body.id, fileName: 'messy-prices-fixed.csv', inserted: 7, updated: 5, skipped: 0 });
    const history = await planner.get('/api/audit?entity=price');
    expect(history.body.rows[0]).toMatchObject({ action: 'price.import', entity: 'price' });
    const again = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'update' });
    expect(again.status).toBe(409);
  });

  it('a price far from its history is a warning the planner accepts before the commit (issue 15)', async () => {
    const text = ['item;season;delivery point;price;unit;observed on', 'nitrogen;2025/26;Co-op input depot;1214;EUR/kg N;14/11/2025', 'wheat;2025/26;Larkfield terminal;20,41;EUR/t;14/08/2025'].join('\n');
    const res = await uploadImport(planner, 'prices', text, 'slips.csv', { decimalMark: 'comma' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ errorCount: 0, warningCount: 2, decimalMark: 'comma', delimiter: ';' });
    expect(res.body.warnings.map((w: { row: number; message: string }) => [w.row, w.message.split(' is ')[0]])).toEqual([
      [2, '1,214 EUR/kg N'],
      [3, '20.41 EUR/t'],
    ]);
    const refused = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'skip' });
    expect(refused.status).toBe(409);
    expect(refused.body.error).toMatchObject({ code: 'needs_confirmation' });
    expect(await priceOf('nitrogen', '2025/26', 'Co-op input depot', '2025-11-14')).toBeNull();
    const started = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'skip', acceptWarnings: true });
    expect(started.status).toBe(202);
    for (let i = 0; i < 200 && (await planner.get(`/api/imports/${res.body.id}`)).body.status === 'committing'; i++) await new Promise((r) => setTimeout(r, 25));
    expect(await priceOf('nitrogen', '2025/26', 'Co-op input depot', '2025-11-14')).toBe(1214);
    expect(await priceOf('wheat', '2025/26', 'Larkfield terminal', '2025-08-14')).toBe(20.41);
    // The later tests re-import the whole table; they should not meet these two.
    await t.database.db.execute(sql`delete from price_observations where price in (1214, 20.41)`);
  });

  it('rows that already exist are skipped or updated, as the planner chooses', async () => {
    const old1 = demoPrice('wheat', '2019/20', 'Ashby elevator', '2019-08-15');
    const old2 = demoPrice('diesel', '2019/20', 'Co-op input depot', '2020-03-01');
    const csv = [
      'item,season,delivery_point,price,currency,source,observed_on',
      `wheat,2019/20,Ashby elevator,${old1 + 10},EUR,Corrected bid,2019-08-15`,
      `diesel,2019/20,Co-op input depot,${old2 + 0.1},EUR,Corrected list,2020-03-01`,
      'canola,2019/20,Ashby elevator,400,EUR,Late bid,2019-10-15',
    ].join('\n');
    const first = await uploadImport(planner, 'prices', csv, 'corrections.csv');
    expect(first.body).toMatchObject({ errorCount: 0, existingRows: 2, existing: { prices: 2 } });
    const skipped = await commit(first.body.id, 'skip');
    expect(skipped.body.counts).toEqual({ inserted: 1, updated: 0, skipped: 2 });
    expect(await priceOf('wheat', '2019/20', 'Ashby elevator', '2019-08-15')).toBe(old1);
    const second = await uploadImport(planner, 'prices', csv, 'corrections.csv');
    expect(second.body.existingRows).toBe(3);
    const updated = await commit(second.body.id, 'update');
    expect(updated.body.counts).toEqual({ inserted: 0, updated: 3, skipped: 0 });
    expect(await priceOf('wheat', '2019/20', 'Ashby elevator', '2019-08-15')).toBe(old1 + 10);
    expect(await priceOf('diesel', '2019/20', 'Co-op input depot', '2020-03-01')).toBe(old2 + 0.1);
  });

  it('an XLSX workbook of farm records, with land, commits', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Records 2025');
    ws.addRow(['Farm', 'Season', 'Item', 'Quantity', 'Unit', 'Land (ha)']);
    ws.addRow(['F04', '2025/26', 'wheat', 1312.5, 't', 388]);
    ws.addRow(['F04', '2025/26', 'nitrogen', { formula: '50000+1200', result: 51200 }, 'kg N', 388]);
    ws.addRow(['f05', '2025/26', 'Diesel', 28750, 'litres', 402.5]);
    const res = await uploadImport(planner, 'records', Buffer.from(await wb.xlsx.writeBuffer()), 'records.xlsx');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ format: 'xlsx', sheet: 'Records 2025', errorCount: 0, toWrite: { records: 3, factors: 2 } });
    expect(res.body.mapping).toEqual({ farm: 'Farm', season: 'Season', item: 'Item', quantity: 'Quantity', unit: 'Unit', land_ha: 'Land (ha)' });
    // The demo co-op has records and land for every farm and season.
    expect(res.body.existing).toEqual({ prices: 0, records: 3, factors: 2, contracts: 0 });
    const done = await commit(res.body.id, 'update');
    expect(done.body.countsByTable).toMatchObject({ records: { updated: 3 }, factors: { updated: 2 } });
    const got = await rows(sql`
      select f.code, i.code as item, r.quantity from farm_records r join farms f on f.id = r.farm_id join items i on i.id = r.item_id
      join seasons s on s.id = r.season_id where s.label = '2025/26' and f.code in ('F04', 'F05') and i.code in ('wheat', 'nitrogen', 'diesel') order by f.code, i.id`);
    expect(got.map((r) => [r.code, r.item, Number(r.quantity)])).toEqual([
      ['F04', 'wheat', 1312.5],
      ['F04', 'nitrogen', 51200],
      ['F04', 'diesel', demo.records.find((r) => r.farm === 'F04' && r.season === '2025/26' && r.item === 'diesel')!.quantity],
      ['F05', 'wheat', demo.records.find((r) => r.farm === 'F05' && r.season === '2025/26' && r.item === 'wheat')!.quantity],
      ['F05', 'nitrogen', demo.records.find((r) => r.farm === 'F05' && r.season === '2025/26' && r.item === 'nitrogen')!.quantity],
      ['F05', 'diesel', 28750],
    ]);
    const land = await rows(sql`select value from farm_season_factors x join farms f on f.id = x.farm_id join seasons s on s.id = x.season_id where f.code = 'F05' and s.label = '2025/26' and x.factor = 'land_ha'`);
    expect(Number(land[0].value)).toBe(402.5);
  });

  it('a wide observation file becomes co-op prices, farm records and land', async () => {
    const res = await uploadImport(planner, 'observations', fixture('observations-wide.csv'), 'panel.csv', { deliveryPoint: 'Larkfield terminal' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ errorCount: 0, deliveryPoint: 'Larkfield terminal', toWrite: { prices: 2, records: 6, factors: 3 }, existing: { prices: 0, records: 6, factors: 3 } });
    expect(res.body.notes[0]).toBe('Prices are stored as co-op prices at Larkfield terminal, dated the first day of their season, in EUR.');
    const done = await commit(res.body.id, 'update');
    expect(done.body.counts).toEqual({ inserted: 2, updated: 9, skipped: 0 });
    // (230 + 236 + 233) / 3 = 233, on the season's first day.
    expect(await priceOf('wheat', '2025/26', 'Larkfield terminal', '2025-07-01')).toBe(233);
    expect(await priceOf('nitrogen', '2025/26', 'Larkfield terminal', '2025-07-01')).toBeCloseTo(1.13, 12);
    const land = await rows(sql`select f.code, x.value from farm_season_factors x join farms f on f.id = x.farm_id join seasons s on s.id = x.season_id where s.label = '2025/26' and f.code in ('F01','F02','F03') order by f.code`);
    expect(land.map((r) => Number(r.value))).toEqual([405, 260.5, 590]);
  });

  it('validating again with a mapping chosen by the planner clears the mapping errors', async () => {
    const csv = 'Commodity,Crop year,Quote,Point,Day\nwheat,2022/23,251,Millbrook store,2022-11-02\n';
    const res = await uploadImport(planner, 'prices', csv, 'odd-headers.csv');
    expect(res.body.errors).toEqual([
      { row: 1, column: null, message: 'no column is mapped to price (Price)' },
      { row: 1, column: null, message: 'no column is mapped to observed_on (Observed on)' },
    ]);
    expect(res.body.suggestedMapping).toEqual({ item: 'Commodity', season: 'Crop year', delivery_point: 'Point' });
    const bad = await planner.post(`/api/imports/${res.body.id}/validate`).send({ mapping: { price: 'Cost' } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual([{ path: 'body.mapping.price', message: 'The file has no column "Cost"' }]);
    const ok = await planner.post(`/api/imports/${res.body.id}/validate`).send({ mapping: { price: 'Quote', observed_on: 'Day' } });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ errorCount: 0, mapping: { price: 'Quote', observed_on: 'Day' } });
    const done = await commit(res.body.id, 'skip');
    expect(done.body.counts).toEqual({ inserted: 1, updated: 0, skipped: 0 });
    expect(await priceOf('wheat', '2022/23', 'Millbrook store', '2022-11-02')).toBe(251);
  });

  it('the list shows recent imports to planners and administrators', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const list = await admin.get('/api/imports?limit=3');
    expect(list.status).toBe(200);
    expect(list.body).toHaveLength(3);
    expect(list.body[0]).toMatchObject({ kind: 'prices', fileName: 'odd-headers.csv', status: 'committed', createdBy: 'Priya Planner', counts: { inserted: 1 } });
  });
});

describe('limits and refusals', () => {
  it('a file over 20 MB answers 413', async () => {
    const res = await uploadImport(planner, 'prices', Buffer.alloc(20 * 1024 * 1024 + 1, 'a'), 'huge.csv');
    expect(res.status).toBe(413);
    expect(res.body.error).toEqual({ code: 'too_large', message: 'The file is larger than 20 MB; split it into smaller files' });
  });

  it('a file of more than 200,000 rows answers 422 and is not stored', async () => {
    const before = (await tableCounts()).imports;
    const res = await uploadImport(planner, 'prices', `item\n${'wheat\n'.repeat(200_001)}`, 'long.csv');
    expect(res.status).toBe(422);
    expect(res.body.error.message).toBe('The file has more than 200,000 data rows; split it into files of at most 200,000 rows');
    expect((await tableCounts()).imports).toBe(before);
  });

  it('an XLSX zip bomb answers 422 before it is parsed', async () => {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Prices').addRow(['item', 'price']);
    const bomb = replaceParts(Buffer.from(await wb.xlsx.writeBuffer()), { 'xl/worksheets/sheet1.xml': inflatingSheet(40 * 1024 * 1024) });
    const res = await uploadImport(planner, 'prices', bomb, 'prices.xlsx');
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(/^The workbook expands \d+ times \(\d+ KB to 40 MB\); more than 100 times is refused as a likely zip bomb$/);
  });

  it('answers 400 for a missing file, an unknown kind, a mapping that is not JSON and an unknown delivery point', async () => {
    const noFile = await planner.post('/api/imports').field('kind', 'prices');
    expect(noFile.status).toBe(400);
    expect(noFile.body.error.details).toEqual([{ path: 'body.file', message: 'Send the file in the form field "file"' }]);
    const kind = await uploadImport(planner, 'weather', 'a\n1\n', 'x.csv');
    expect(kind.status).toBe(400);
    expect(kind.body.error.details[0].path).toBe('body.kind');
    const mapping = await uploadImport(planner, 'prices', 'a\n1\n', 'x.csv', { mapping: '{price:' });
    expect(mapping.body.error.details).toEqual([{ path: 'body.mapping', message: 'The mapping is not valid JSON' }]);
    const dp = await uploadImport(planner, 'observations', fixture('observations-wide.csv'), 'x.csv', { deliveryPoint: 'Nowhere' });
    expect(dp.status).toBe(400);
    expect(dp.body.error.details[0]).toMatchObject({ path: 'body.deliveryPoint' });
  });

  it('only planners upload and commit; an unknown import is 404', async () => {
    for (const email of ['member@example.org', 'treasurer@example.org', 'admin@example.org']) {
      const a = await signedIn(t.app, email);
      expect((await uploadImport(a, 'prices', fixture('messy-prices-fixed.csv'), 'x.csv')).status).toBe(403);
      expect((await a.post('/api/imports/1/commit').send({ onExisting: 'skip' })).status).toBe(403);
    }
    expect((await planner.get('/api/imports/99999')).status).toBe(404);
    expect((await planner.post('/api/imports/99999/commit').send({ onExisting: 'skip' })).status).toBe(404);
  });
});

describe('a failed commit', () => {
  it('leaves every table unchanged when the database refuses a row mid-way, and can be committed again', async () => {
    // 320 updates of demo prices, then 4,180 new wheat prices; the database refuses row 3,002, in the
    // second chunk of 2,000 rows (the first chunk is written by then).
    const lines = ['item,season,delivery_point,price,currency,source,observed_on'];
    for (const p of demo.prices) lines.push(`${p.item},${p.season},${p.deliveryPoint},${p.price + 1},EUR,Re-keyed,${p.observedOn}`);
    for (const s of demo.seasons) {
      for (let k = 0; k < 209; k++) lines.push(`wheat,${s.label},Larkfield terminal,${200 + k / 10},EUR,Daily bid,${DateTime.utc(s.startYear, 9, 1).plus({ days: k }).toISODate()}`);
    }
    lines[3001] = lines[3001].replace(/,[\d.]+,EUR,/, ',999.999,EUR,');
    await t.database.db.execute(sql`alter table price_observations add constraint test_refuse_999 check (price <> 999.999)`);
    try {
      const res = await uploadImport(planner, 'prices', lines.join('\n'), 'daily-bids.csv');
      expect(res.body).toMatchObject({ errorCount: 0, totalRows: 4500, existingRows: 320 });
      const before = await tableCounts();
      const [{ total: priceSum }] = await rows(sql`select sum(price)::text as total from price_observations`);
      // Inputs priced at 0.6 EUR/kg re-keyed at +1 are beyond 3× their history: accepted here.
      const done = await commit(res.body.id, 'update', true);
      expect(done.body.status).toBe('failed');
      expect(done.body.counts).toBeNull();
      expect(done.body.failure).toMatch(/^The database refused the prices from file rows 2002–4001: .*test_refuse_999.*\. Nothing was written\.$/);
      expect(await tableCounts()).toEqual(before);
      expect((await rows(sql`select sum(price)::text as total from price_observations`))[0].total).toBe(priceSum);
      await t.database.db.execute(sql`alter table price_observations drop constraint test_refuse_999`);
      const retried = await commit(res.body.id, 'update', true);
      expect(retried.body).toMatchObject({ status: 'committed', counts: { inserted: 4180, updated: 320, skipped: 0 } });
      expect(await priceOf('wheat', '2010/11', 'Larkfield terminal', '2010-09-01')).toBe(200);
    } finally {
      await t.database.db.execute(sql`alter table price_observations drop constraint if exists test_refuse_999`);
    }
  });
});

describe('exports re-import cleanly', () => {
  it('prices as CSV and as XLSX, and records as CSV, map themselves and change nothing when committed', async () => {
    await t.database.db.execute(sql`update price_observations set source = '=HYPERLINK("http://example.org")' where id = (select min(id) from price_observations)`);
    const prices = await priceExportRows(t.database.db);
    const csv = toCsv(prices, PRICE_COLUMNS);
    expect(csv).toContain(`"'=HYPERLINK(""http://example.org"")"`);
    for (const [file, name] of [
      [Buffer.from(csv), 'prices.csv'],
      [await toXlsx(prices, PRICE_COLUMNS, 'Prices'), 'prices.xlsx'],
    ] as const) {
      const res = await uploadImport(planner, 'prices', file, name);
      expect(res.body).toMatchObject({ errorCount: 0, totalRows: prices.length, existingRows: prices.length, ignoredColumns: [] });
      const done = await commit(res.body.id, 'update');
      expect(done.body.counts).toEqual({ inserted: 0, updated: prices.length, skipped: 0 });
      expect(await priceExportRows(t.database.db)).toEqual(prices);
    }
    const records = await recordExportRows(t.database.db, { role: 'planner', farmId: null });
    const res = await uploadImport(planner, 'records', toCsv(records, RECORD_COLUMNS), 'records.csv');
    expect(res.body).toMatchObject({ errorCount: 0, toWrite: { records: 2800, factors: 400 }, existingRows: 3200 });
    // Quantities earlier tests stored far from their farm's history per hectare come back as
    // warnings (accepted here: the file is the database's own content).
    expect(res.body.warnings.every((w: { column: string; message: string }) => w.column === 'quantity' && / t\/ha|\/ha, about /.test(w.message))).toBe(true);
    const done = await commit(res.body.id, 'update', true);
    expect(done.body.counts).toEqual({ inserted: 0, updated: 3200, skipped: 0 });
    expect(await recordExportRows(t.database.db, { role: 'planner', farmId: null })).toEqual(records);
  });
});

describe('property: malformed CSV through the API', () => {
  const cell = fc.oneof(
    fc.constantFrom('wheat', 'barley', '2024/25', '2031/32', 'Larkfield terminal', 'Dover', '230', '-5', '12,5x', '1 234,5', '2024-08-20', '31/12/2024', 'EUR', '', '"', "'=1+1"),
    fc.string({ maxLength: 10 }),
  );
  const text = fc
    .tuple(
      fc.shuffledSubarray(['item', 'season', 'delivery_point', 'price', 'currency', 'source', 'observed_on', 'farm', 'quantity', 'land_ha', 'price:wheat', 'input:nitrogen'], { minLength: 0 }),
      fc.array(fc.array(cell, { maxLength: 8 }), { maxLength: 12 }),
      fc.constantFrom(',', ';'),
    )
    // A cell no field accepts anywhere: the file can never be fully valid.
    .map(([header, body, d]) => [header, ...body, ['12,5x', 'Dover', '2031/32', 'barley', '-5']].map((r) => r.join(d)).join('\n'));

  it('always answers a 4xx with a message or a preview with errors, never a 500, and never writes', async () => {
    const before = await tableCounts();
    let staged = 0;
    await fc.assert(
      fc.asyncProperty(text, fc.constantFrom('prices', 'records', 'observations'), async (body, kind) => {
        const res = await uploadImport(planner, kind, body, 'random.csv');
        expect(res.status).toBeLessThan(500);
        if (res.status !== 201) {
          expect(res.status).toBeGreaterThanOrEqual(400);
          expect(res.body.error.message.length).toBeGreaterThan(0);
          return;
        }
        staged++;
        expect(res.body.errorCount).toBeGreaterThan(0);
        for (const e of res.body.errors) expect(e.message.length).toBeGreaterThan(0);
        const c = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'update' });
        expect(c.status).toBe(409);
        expect(c.body.error.message).toMatch(/error\(s\)/);
      }),
      { numRuns: 30, seed: 1209 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
    expect(await tableCounts()).toEqual({ ...before, imports: before.imports + staged });
  });
});
