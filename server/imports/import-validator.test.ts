import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import ExcelJS from 'exceljs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { buildDemoCoop } from '../../seed/demo-coop.js';
import type { Lookups, ValidationOptions } from './import-types.js';
import { ImportFileError } from './import-file-error.js';
import { IMPORT_LIMITS } from './import-limits.js';
import { validateImport } from './import-validator.js';
import type { RowSource } from './packed-rows.js';
import type { ZodType } from 'zod';
import { contractSchema } from '../../shared/contract-schemas.js';
import { factorValueSchema, landSchema, priceSchema, recordSchema } from '../../shared/data-schemas.js';

const fixtures = path.join(path.dirname(fileURLToPath(import.meta.url)), '../../tests/fixtures/imports');
const fixture = (name: string) => fs.readFileSync(path.join(fixtures, name));

/** The demo co-op's reference data with ids in list order (no database needed). */
function demoLookups(): Lookups {
  const demo = buildDemoCoop();
  return {
    items: demo.items.map((it, i) => ({ id: i + 1, code: it.code, name: it.name, unit: it.unit, role: it.role })),
    seasons: demo.seasons.map((s, i) => ({ id: i + 1, label: s.label, startYear: s.startYear, startsOn: s.startsOn })),
    farms: demo.farms.map((f, i) => ({ id: i + 1, code: f.code })),
    deliveryPoints: demo.deliveryPoints.map((d, i) => ({ id: i + 1, name: d.name })),
    currency: 'EUR',
    decimalMark: 'point',
  };
}
const lookups = demoLookups();
const id = {
  item: (code: string) => lookups.items.find((i) => i.code === code)!.id,
  season: (label: string) => lookups.seasons.find((s) => s.label === label)!.id,
  farm: (code: string) => lookups.farms.find((f) => f.code === code)!.id,
  dp: (name: string) => lookups.deliveryPoints.find((d) => d.name === name)!.id,
};

/** Every checked row of a table, as objects. */
const all = <T>(rows: RowSource<T>) => rows.slice(0, rows.length);

const run = (text: string | Buffer, options: Partial<ValidationOptions> & { kind: ValidationOptions['kind'] }) =>
  validateImport(typeof text === 'string' ? Buffer.from(text) : text, { fileName: 'test.csv', ...options }, lookups);

describe('prices', () => {
  it('lists exactly the wrong rows of a messy file, with row, column and message', async () => {
    const out = await run(fixture('messy-prices.csv'), { kind: 'prices', fileName: 'messy-prices.csv' });
    expect(out.mapping).toEqual({
      item: 'Item',
      season: 'Season',
      delivery_point: 'Delivery point',
      price: 'Price',
      unit: 'Unit',
      currency: 'Currency',
      source: 'Source',
      observed_on: 'Observed date',
    });
    expect(out.ignoredColumns).toEqual(['Notes']);
    expect(out.errors).toEqual([
      { row: 4, column: 'Price', message: '"12,5x" is not a number: it has the letter "x" in it' },
      { row: 5, column: 'Item', message: 'unknown item "barley" (items: wheat, canola, nitrogen, phosphate, potash, diesel, labour)' },
      { row: 6, column: 'Unit', message: 'unit "kg" is not nitrogen\'s unit "kg N"; nitrogen prices are per kg N' },
      { row: 8, column: 'Season', message: 'unknown season "2031/32" (seasons run from 2006/07 to 2025/26)' },
      {
        row: 9,
        column: 'Price',
        message: '"1 234,5" is written with a decimal comma (1234,5), but this co-op writes numbers with a decimal point (1234.5); it was not read (the decimal mark is a co-op setting, and an import can choose its own)',
      },
      { row: 10, column: 'Delivery point', message: 'unknown delivery point "Dover quay" (delivery points: Larkfield terminal, Ashby elevator, Millbrook store, Co-op input depot)' },
      { row: 11, column: 'Observed date', message: '"01/10/2024" is ambiguous (day/month or month/day?): write dates as YYYY-MM-DD' },
      { row: 12, column: null, message: 'the row repeats row 2 (same item, season, delivery point and observed date)' },
      { row: 13, column: 'Price', message: '"-0.9" is not a price: a price must be more than 0' },
    ]);
    expect({ totalRows: out.totalRows, validRows: out.validRows, errorCount: out.errorCount }).toEqual({ totalRows: 13, validRows: 4, errorCount: 9 });
    expect(out.preview.map((p) => p.row)).toEqual([2, 3, 4, 5, 6, 8, 9, 10, 11, 12, 13, 14, 15]);
    expect(out.preview[2].cells[3]).toBe('12,5x');
  });

  it('turns the corrected file into rows, with defaults for currency and source', async () => {
    const out = await run(fixture('messy-prices-fixed.csv'), { kind: 'prices', fileName: 'fixed.csv' });
    expect(out.errors).toEqual([]);
    expect(all(out.writes.prices)).toHaveLength(12);
    expect(all(out.writes.prices)[0]).toEqual({
      row: 2,
      itemId: id.item('wheat'),
      seasonId: id.season('2024/25'),
      deliveryPointId: id.dp('Larkfield terminal'),
      price: 231.5,
      currency: 'EUR',
      source: 'Grain desk bid',
      observedOn: '2024-08-20',
    });
    // "eur" is upper-cased; the quoted comma stays inside its cell.
    expect(all(out.writes.prices).find((p) => p.row === 11)!).toMatchObject({ itemId: id.item('potash'), currency: 'EUR' });
    expect(all(out.writes.prices).find((p) => p.row === 13)!.source).toBe('Grain desk, late bid');
  });

  it('checks the unit a price header names against each row\'s item', async () => {
    const csv = 'item,season,delivery_point,price (EUR/t),observed_on\nwheat,2024,Larkfield terminal,230,2024-08-20\nnitrogen,2024,Co-op input depot,1.1,2024-10-01\n';
    const out = await run(csv, { kind: 'prices' });
    expect(out.errors).toEqual([{ row: 3, column: 'price (EUR/t)', message: 'the column\'s unit "t" is not nitrogen\'s unit "kg N"' }]);
    expect(all(out.writes.prices)[0]).toMatchObject({ currency: 'EUR', source: 'Import of test.csv', seasonId: id.season('2024/25') });
  });

  it('takes the delivery point for the whole file when the file has no such column', async () => {
    const csv = 'item,season,price,observed_on\nwheat,2024/25,230,2024-08-20\n';
    expect((await run(csv, { kind: 'prices' })).errors).toEqual([{ row: 1, column: null, message: 'no column is mapped to delivery_point (Delivery point); map one or choose a delivery point for the whole file' }]);
    const out = await run(csv, { kind: 'prices', deliveryPoint: 'ashby elevator' });
    expect(out.errors).toEqual([]);
    expect(all(out.writes.prices)[0].deliveryPointId).toBe(id.dp('Ashby elevator'));
  });

  it('applies a mapping the client chose over the suggestion, and refuses one naming a missing column', async () => {
    const csv = 'Commodity,Crop year,Quote,Point,Day\nwheat,2024/25,230,Larkfield terminal,2024-08-20\n';
    const first = await run(csv, { kind: 'prices' });
    expect(first.suggestedMapping).toEqual({ item: 'Commodity', season: 'Crop year', delivery_point: 'Point' });
    expect(first.errors.map((e) => e.message)).toEqual(['no column is mapped to price (Price)', 'no column is mapped to observed_on (Observed on)']);
    const second = await run(csv, { kind: 'prices', mapping: { price: 'Quote', observed_on: 'Day' } });
    expect(second.errors).toEqual([]);
    expect(all(second.writes.prices)[0].price).toBe(230);
    await expect(run(csv, { kind: 'prices', mapping: { price: 'Cost' } })).rejects.toMatchObject({
      status: 400,
      details: [{ path: 'body.mapping.price', message: 'The file has no column "Cost"' }],
    });
    await expect(run(csv, { kind: 'prices', mapping: { colour: 'Quote' } })).rejects.toMatchObject({ status: 400, details: [{ path: 'body.mapping.colour' }] });
  });

  it('reads back cells our exports escaped against formulas', async () => {
    const csv = "item,season,delivery_point,price,source,observed_on\nwheat,2024/25,Larkfield terminal,230,'=HYPERLINK(\"x\"),2024-08-20\n";
    const out = await run(csv, { kind: 'prices' });
    expect(all(out.writes.prices)[0].source).toBe('=HYPERLINK("x")');
  });
});

describe('prices from a decimal-comma spreadsheet (issue 15)', () => {
  const comma: Lookups = { ...lookups, decimalMark: 'comma' };
  const history: Lookups['priceHistory'] = {
    [id.item('wheat')]: [
      { startYear: 2022, median: 231.2, count: 4 },
      { startYear: 2023, median: 204.1, count: 4 },
      { startYear: 2024, median: 198.5, count: 4 },
    ],
    [id.item('nitrogen')]: [{ startYear: 2023, median: 1.21, count: 9 }],
  };
  const runComma = (text: string, extra: Partial<Lookups> = {}) => validateImport(Buffer.from(text), { fileName: 'prices.csv', kind: 'prices' }, { ...comma, ...extra });

  it('reads a semicolon-separated file with decimal commas, the unit as EUR/t and a date 14/08/2026', async () => {
    const text = ['item;season;delivery point;price;unit;observed on', 'wheat;2024/25;Larkfield terminal;204,5;EUR/t;14/08/2024', 'nitrogen;2024/25;Co-op input depot;1,18;€/kg N;2024-10-01'].join('\r\n');
    const out = await runComma(text);
    expect(out.delimiter).toBe(';');
    expect(out.errors).toEqual([]);
    expect(all(out.writes.prices).map((p) => [p.price, p.currency, p.observedOn])).toEqual([
      [204.5, 'EUR', '2024-08-14'],
      [1.18, 'EUR', '2024-10-01'],
    ]);
  });

  it('refuses 204,5 under a point and 2O4,5 under a comma instead of reading 2045 or 245', async () => {
    const text = 'item,season,delivery point,price,observed on\nwheat,2024/25,Larkfield terminal,"204,5",2024-08-14\n';
    const point = await run(text, { kind: 'prices' });
    expect(point.errors.map((e) => [e.row, e.column])).toEqual([[2, 'price']]);
    expect(point.errors[0].message).toMatch(/^"204,5" is written with a decimal comma/);
    const letter = await runComma('item;season;delivery point;price;observed on\nwheat;2024/25;Larkfield terminal;2O4,5;2024-08-14\n');
    expect(letter.errors).toEqual([{ row: 2, column: 'price', message: '"2O4,5" is not a number: it has the letter "O" in it' }]);
  });

  it('lists every problem in one pass, a repeated row included, and offers an unknown season for creation', async () => {
    const text = [
      'item;season;delivery point;price;unit;observed on',
      'wheat;2024/25;Larkfield terminal;abc;EUR/t;2024-08-14',
      'wheat;2024/25;Larkfield terminal;204,5;EUR/t;2024-08-14',
      'wheat;2027/28;Larkfield terminal;210;EUR/t;2027-08-14',
      'wheat;2027;Ashby elevator;211;EUR/t;2027-08-14',
    ].join('\n');
    const out = await runComma(text);
    expect(out.errors.map((e) => [e.row, e.column, e.message.split(' (')[0]])).toEqual([
      [2, 'price', '"abc" is not a number: it has the letter "a" in it'],
      [3, null, 'the row repeats row 2'],
      [4, 'season', 'unknown season "2027/28"'],
      [5, 'season', 'unknown season "2027"'],
    ]);
    expect(out.unknownSeasons).toEqual([{ label: '2027/28', startYear: 2027, row: 4, rows: 2 }]);
  });

  it('warns about nitrogen at 1,214 EUR/kg N and wheat at 20.41 EUR/t, and not about prices near their history', async () => {
    const text = [
      'item;season;delivery point;price;unit;observed on',
      'nitrogen;2024/25;Co-op input depot;1214;EUR/kg N;2024-10-01',
      'wheat;2024/25;Larkfield terminal;20,41;EUR/t;2024-08-14',
      'wheat;2024/25;Ashby elevator;215,8;EUR/t;2024-08-14',
    ].join('\n');
    const out = await runComma(text, { priceHistory: history });
    expect(out.errors).toEqual([]);
    expect(out.warningCount).toBe(2);
    expect(out.warnings).toEqual([
      {
        row: 2,
        column: 'price',
        message: "1,214 EUR/kg N is about 1,000 times Nitrogen (N)'s recent median of 1.21 EUR/kg N (over 9 prices); is it a price per tonne entered per kg N?",
      },
      { row: 3, column: 'price', message: "20.41 EUR/t is about 1/10 of Wheat's recent median of 204.1 EUR/t (over 12 prices); is the decimal mark in the right place?" },
    ]);
    // The warned rows are still rows to write: the planner may accept them.
    expect(all(out.writes.prices)).toHaveLength(3);
  });
});

describe('records', () => {
  it('reads a semicolon file and names the bad cells', async () => {
    const out = await run(fixture('records-semicolon.csv'), { kind: 'records' });
    expect(out.delimiter).toBe(';');
    expect(out.errors).toEqual([
      {
        row: 2,
        column: 'quantity (t)',
        message: '"1520,5" is written with a decimal comma (1234,5), but this co-op writes numbers with a decimal point (1234.5); it was not read (the decimal mark is a co-op setting, and an import can choose its own)',
      },
      { row: 4, column: 'quantity (t)', message: 'empty cell: quantity is required' },
      { row: 5, column: 'farm', message: 'unknown farm "F99": no farm has this code' },
    ]);
    expect(all(out.writes.records)).toEqual([{ row: 3, farmId: id.farm('F02'), seasonId: id.season('2025/26'), itemId: id.item('canola'), quantity: 410 }]);
  });

  it('reads decimal commas when the import says so', async () => {
    const out = await run('farm;season;item;quantity (t)\nF01;2025/26;wheat;1520,5\nF02;2025/26;wheat;1.520\n', { kind: 'records', decimalMark: 'comma' });
    expect(out.decimalMark).toBe('comma');
    expect(out.errors).toEqual([
      { row: 3, column: 'quantity (t)', message: '"1.520" is ambiguous: with a decimal comma (1234,5) write thousands without points (1520), so they cannot be misread as decimals' },
    ]);
    expect(all(out.writes.records)).toEqual([{ row: 2, farmId: id.farm('F01'), seasonId: id.season('2025/26'), itemId: id.item('wheat'), quantity: 1520.5 }]);
  });
  it('writes land once per farm and season and refuses two different values', async () => {
    const csv = 'farm,season,item,quantity,land_ha\nF01,2025/26,wheat,1500,405\nF01,2025/26,canola,500,405\nF01,2025/26,diesel,30000,410\nF02,2025/26,,,260\n';
    const out = await run(csv, { kind: 'records' });
    expect(out.errors).toEqual([{ row: 4, column: 'land_ha', message: '410 differs from 405 on row 2 for the same farm and season' }]);
    expect(all(out.writes.factors)).toEqual([
      { row: 2, farmId: id.farm('F01'), seasonId: id.season('2025/26'), factor: 'land_ha', value: 405 },
      { row: 5, farmId: id.farm('F02'), seasonId: id.season('2025/26'), factor: 'land_ha', value: 260 },
    ]);
  });

  it('refuses negative quantities and a quantity in another unit', async () => {
    const csv = 'farm,season,item,quantity,unit\nF01,2025/26,nitrogen,-5,kg N\nF01,2025/26,phosphate,900,kg P\n';
    const out = await run(csv, { kind: 'records' });
    expect(out.errors).toEqual([
      { row: 2, column: 'quantity', message: '"-5" is negative: quantities are 0 or more, inputs too (the column or the item says whether it is an input)' },
      { row: 3, column: 'unit', message: 'unit "kg P" is not phosphate\'s unit "kg P2O5"; phosphate is recorded in kg P2O5' },
    ]);
  });
});

describe('observations (the wide layout of the fit command)', () => {
  // normalHeader reads `_` as a space; the factor's name keeps it.
  it('fixed factors named with underscores import under their own name', async () => {
    const csv = 'season,farm,fixed:irrigated_ha,fixed:Stock-Units\n2025/26,F01,120.5,40\n';
    const out = await run(csv, { kind: 'observations', fileName: 'panel.csv' });
    expect(out.errors).toEqual([]);
    expect(out.mapping).toMatchObject({ 'fixed:irrigated_ha': 'fixed:irrigated_ha', 'fixed:stock_units': 'fixed:Stock-Units' });
    expect(all(out.writes.factors).map((f) => [f.row, f.factor, f.value])).toEqual([
      [2, 'irrigated_ha', 120.5],
      [2, 'stock_units', 40],
    ]);
  });

  it('maps prices to co-op prices (mean of the farm rows), quantities to records and land to factors', async () => {
    const out = await run(fixture('observations-wide.csv'), { kind: 'observations', fileName: 'panel.csv' });
    expect(out.errors).toEqual([]);
    expect(out.mapping).toMatchObject({ season: 'season', farm: 'farm', 'price:wheat': 'price:wheat', 'input:nitrogen': 'input:nitrogen', 'fixed:land_ha': 'fixed:land' });
    const s = id.season('2025/26');
    const depot = id.dp('Co-op input depot');
    expect(all(out.writes.prices)).toEqual([
      // (230 + 236 + 233) / 3 = 233 and (1.10 + 1.16 + 1.13) / 3 = 1.13
      { row: 2, itemId: id.item('wheat'), seasonId: s, deliveryPointId: depot, price: 233, currency: 'EUR', source: 'Observation import: panel.csv', observedOn: '2025-07-01' },
      { row: 2, itemId: id.item('nitrogen'), seasonId: s, deliveryPointId: depot, price: expect.closeTo(1.13, 12), currency: 'EUR', source: 'Observation import: panel.csv', observedOn: '2025-07-01' },
    ]);
    expect(all(out.writes.records)).toHaveLength(6);
    expect(all(out.writes.records)[0]).toEqual({ row: 2, farmId: id.farm('F01'), seasonId: s, itemId: id.item('wheat'), quantity: 1520.5 });
    expect(all(out.writes.factors).map((f) => [f.farmId, f.factor, f.value])).toEqual([
      [id.farm('F01'), 'land_ha', 405],
      [id.farm('F02'), 'land_ha', 260.5],
      [id.farm('F03'), 'land_ha', 590],
    ]);
    expect(out.notes).toEqual([
      'Prices are stored as co-op prices at Co-op input depot, dated the first day of their season, in EUR.',
      "price:wheat: the rows of 1 season(s) disagree; each season's co-op price is the mean of its rows (widest: 230 to 236 in 2025/26).",
      "price:nitrogen: the rows of 1 season(s) disagree; each season's co-op price is the mean of its rows (widest: 1.1 to 1.16 in 2025/26).",
    ]);
  });

  it('names columns for unknown items and quantities with the wrong sign convention', async () => {
    const csv = 'season,farm,price:wheat,price:barley,output:nitrogen,input:diesel\n2025,F01,230,180,100,30000\n2025,,231,,,5\n';
    const out = await run(csv, { kind: 'observations' });
    expect(out.errors).toEqual([
      { row: 1, column: 'price:barley', message: 'unknown item "barley" (items: wheat, canola, nitrogen, phosphate, potash, diesel, labour)' },
      { row: 1, column: 'output:nitrogen', message: 'nitrogen is an input: name the column input:nitrogen' },
      { row: 3, column: 'input:diesel', message: 'a quantity needs a farm: this row has no farm' },
    ]);
  });

  it('maps columns that name the item by its name, and checks a currency the header names', async () => {
    const csv = 'season,farm,Price: Hired labour (USD/h),input:labour\n2025/26,F01,19.5,2600\n';
    const out = await run(csv, { kind: 'observations' });
    expect(out.mapping['price:labour']).toBe('Price: Hired labour (USD/h)');
    expect(out.errors).toEqual([{ row: 1, column: 'Price: Hired labour (USD/h)', message: "the column is in USD; an observation file's prices are stored in the co-op's currency, EUR" }]);
  });

  it('reads the fit command fixture and reports its farms and item as unknown here', async () => {
    const out = await run(fs.readFileSync(path.join(fixtures, '../estimation/nq-panel.csv')), { kind: 'observations' });
    expect(out.errors[0]).toEqual({ row: 1, column: 'price:other', message: 'unknown item "other" (items: wheat, canola, nitrogen, phosphate, potash, diesel, labour)' });
    expect(out.errors[2]).toEqual({ row: 2, column: 'farm', message: 'unknown farm "F001": no farm has this code' });
  });
});

describe('the limits the API keeps (shared/field-limits.ts)', () => {
  /** A value at the limit passes both the import and the API's schema; one just past it fails both. */
  const agrees = (field: ZodType, kept: unknown[], refused: unknown[]) => {
    for (const v of kept) expect(field.safeParse(v).success, `${String(v)} is kept`).toBe(true);
    for (const v of refused) expect(field.safeParse(v).success, `${String(v)} is refused`).toBe(false);
  };
  /** Runs the file and checks its errors as `row|column|message`. */
  const errorsOf = async (csv: string, kind: ValidationOptions['kind'], expected: string[]) => {
    const out = await run(csv, { kind });
    expect(out.errors.map((e) => `${e.row}|${e.column}|${e.message}`)).toEqual(expected);
    return out.writes;
  };

  it('prices: at most 1,000,000,000 per unit and 200 characters of source', async () => {
    const [s200, s201] = ['s'.repeat(200), 's'.repeat(201)];
    const csv = `item,season,delivery_point,price,observed_on,source\nwheat,2024/25,Ashby elevator,1000000000,2024-08-20,${s200}\nwheat,2024/25,Larkfield terminal,1000000001,2024-08-20,x\ncanola,2024/25,Ashby elevator,230,2024-08-20,${s201}\n`;
    const writes = await errorsOf(csv, 'prices', [
      '3|price|"1000000001" is larger than the largest price kept (1,000,000,000)',
      '4|source|the source is 201 characters long; at most 200 are kept',
    ]);
    expect(all(writes.prices).map((p) => p.row)).toEqual([2]);
    agrees(priceSchema.shape.price, [1e9], [1e9 + 1]);
    agrees(priceSchema.shape.source, [s200], [s201]);
  });

  it('records: at most 1,000,000,000,000 of an item and 1,000,000 ha', async () => {
    const csv = 'farm,season,item,quantity,land_ha\nF01,2025/26,wheat,1000000000000,1000000\nF02,2025/26,wheat,1000000000001,1000001\n';
    await errorsOf(csv, 'records', [
      '3|quantity|"1000000000001" is larger than the largest quantity kept (1,000,000,000,000)',
      '3|land_ha|"1000001" ha is more land than the server keeps for a farm (1,000,000 ha)',
    ]);
    agrees(recordSchema.shape.quantity, [1e12], [1e12 + 1]);
    agrees(landSchema.shape.landHa, [1e6], [1e6 + 1]);
  });

  // The import kept any number here before the limits were declared once; the API refused these.
  it('fixed factors: 0 to 1,000,000,000, as the API keeps them', async () => {
    const csv = 'season,farm,fixed:irrigated\n2025/26,F01,1000000000\n2025/26,F02,1000000001\n2025/26,F03,-1\n';
    const writes = await errorsOf(csv, 'observations', [
      '3|fixed:irrigated|"1000000001" is larger than the largest fixed factor kept (1,000,000,000)',
      '4|fixed:irrigated|"-1" is negative: a fixed factor cannot be negative',
    ]);
    expect(all(writes.factors).map((f) => [f.row, f.factor, f.value])).toEqual([[2, 'irrigated', 1e9]]);
    agrees(factorValueSchema.shape.value, [0, 1e9], [-1, 1e9 + 1]);
  });

  // The import kept contract quantities up to 1e12 and prices up to 1e9 per unit before; the
  // contracts API (and the dialog) keep at most 10,000,000 and 1,000,000.
  it('contracts: at most 10,000,000 per contract, 1,000,000 per unit and 40 characters of contract number', async () => {
    const [r40, r41] = ['R'.repeat(40), 'R'.repeat(41)];
    const csv = [
      'contract number,farm,season,item,quantity,price (EUR/t),from,to,status',
      `${r40},F01,2025/26,wheat,10000000,1000000,2025-08,2025-10,signed`,
      'C-2,F01,2025/26,wheat,10000001,200,2025-08,2025-10,signed',
      'C-3,F01,2025/26,wheat,100,1000000.01,2025-08,2025-10,signed',
      `${r41},F01,2025/26,wheat,100,200,2025-08,2025-10,signed`,
    ].join('\n');
    const writes = await errorsOf(csv, 'contracts', [
      '3|quantity|"10000001" is larger than the largest contract quantity kept (10,000,000)',
      '4|price (EUR/t)|"1000000.01" is larger than the largest contract price kept (1,000,000)',
      '5|contract number|the contract number is 41 characters long; at most 40 are kept',
    ]);
    expect(all(writes.contracts).map((c) => [c.row, c.quantity, c.priceCents])).toEqual([[2, 1e7, 1e8]]);
    agrees(contractSchema.shape.quantity, [1e7], [1e7 + 1]);
    agrees(contractSchema.shape.price, [1e6], [1e6 + 0.01]);
    agrees(contractSchema.shape.reference, [r40], [r41]);
  });
});

describe('files', () => {
  it('reads an XLSX worksheet with numbers, dates, formulas and rich text', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Prices');
    ws.addRow(['item', 'season', 'delivery_point', 'price', 'observed_on', 'source']);
    ws.addRow(['wheat', '2024/25', 'Larkfield terminal', 230.25, new Date(Date.UTC(2024, 7, 20)), { richText: [{ text: 'Grain ' }, { text: 'desk' }] }]);
    ws.addRow(['canola', 2024, 'Ashby elevator', { formula: '400+55', result: 455 }, '2024-08-20', 'bid']);
    ws.getCell('E2').numFmt = 'yyyy-mm-dd';
    const out = await run(Buffer.from(await wb.xlsx.writeBuffer()), { kind: 'prices', fileName: 'prices.xlsx' });
    expect(out).toMatchObject({ format: 'xlsx', sheet: 'Prices', errors: [] });
    expect(all(out.writes.prices).map((p) => [p.row, p.price, p.observedOn, p.source])).toEqual([
      [2, 230.25, '2024-08-20', 'Grain desk'],
      [3, 455, '2024-08-20', 'bid'],
    ]);
  });

  it('refuses files it cannot read with a clear message', async () => {
    await expect(run('', { kind: 'prices' })).rejects.toThrow('The file is empty');
    await expect(run('\n\n  \n', { kind: 'prices' })).rejects.toThrow('The file has no header row: it is empty or blank');
    await expect(run('item,season\n', { kind: 'prices' })).rejects.toThrow('The file has a header row but no data rows');
    await expect(run(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), { kind: 'prices' })).rejects.toThrow('This is an old Excel workbook (.xls)');
    await expect(run(Buffer.from('item\u0000price'), { kind: 'prices' })).rejects.toThrow('The file is not a text (CSV) file');
    await expect(run('item\nwheat\n', { kind: 'prices', fileName: 'x.xlsx' })).rejects.toThrow('x.xlsx is named as an Excel workbook but is not one');
  });

  it('stops at the row limit with a 422', async () => {
    const limits = { ...IMPORT_LIMITS, maxRows: 5 };
    const csv = `item\n${'wheat\n'.repeat(6)}`;
    const err = await validateImport(Buffer.from(csv), { kind: 'prices', fileName: 'x.csv' }, lookups, limits).catch((e) => e);
    expect(err).toBeInstanceOf(ImportFileError);
    expect(err).toMatchObject({ status: 422, message: 'The file has more than 5 data rows; split it into files of at most 5 rows' });
  });

  it('decodes a Windows-1252 file and reports an unclosed quote', async () => {
    const bytes = Buffer.from('item,season,delivery_point,price,source,observed_on\nwheat,2024/25,Larkfield terminal,230,Caf\xe9 list,2024-08-20\n', 'latin1');
    const out = await run(bytes, { kind: 'prices' });
    expect(out.encoding).toBe('windows-1252');
    expect(all(out.writes.prices)[0].source).toBe('Café list');
    const broken = await run('item,season,delivery_point,price,observed_on\nwheat,2024/25,"Larkfield terminal,230,2024-08-20\n', { kind: 'prices' });
    expect(broken.errors[0]).toEqual({ row: 2, column: null, message: 'a quoted cell is not closed: the rest of the file was read as one cell' });
  });
});

describe('property: malformed text', () => {
  // Cells that are almost right: the kinds of mistakes spreadsheets and hands make.
  const cell = fc.oneof(
    fc.constantFrom('wheat', 'Wheat', 'barley', '2024/25', '2024', '2024/26', 'Larkfield terminal', 'Dover', '230', '-5', '12,5', '1 234,5', '1e999', '2024-08-20', '2024-02-30', '03/04/2024', 'EUR', 'euro', '', ' ', '"', '""', "'=1+1", '\t', '\r'),
    fc.string({ maxLength: 12 }),
  );
  const row = fc.array(cell, { minLength: 0, maxLength: 9 });
  const header = fc.shuffledSubarray(['item', 'season', 'delivery_point', 'price', 'unit', 'currency', 'source', 'observed_on', 'farm', 'quantity', 'land_ha', 'price:wheat', 'output:wheat', 'input:nitrogen', 'fixed:land', 'price:x', 'item'], { minLength: 0 });
  const file = fc.tuple(header, fc.array(row, { maxLength: 25 }), fc.constantFrom(',', ';', '\t'), fc.constantFrom('\n', '\r\n', '\r')).map(([h, rows, d, nl]) => [h, ...rows].map((r) => r.join(d)).join(nl));
  const mapping = fc.option(
    fc.dictionary(fc.constantFrom('item', 'price', 'season', 'farm', 'quantity', 'price:wheat', 'fixed:land_ha', 'colour'), fc.oneof(fc.constant(null), fc.constantFrom('item', 'price', 'season', 'x', ''))),
    { nil: undefined },
  );
  const anyText = fc.oneof(file, fc.string({ maxLength: 200 }), fc.uint8Array({ maxLength: 200 }).map((b) => Buffer.from(b).toString('latin1')));

  it('either lists errors with a row, a column and a message, or refuses the file with a 4xx; it never throws anything else', async () => {
    await fc.assert(
      fc.asyncProperty(anyText, fc.constantFrom('prices' as const, 'records' as const, 'observations' as const), mapping, fc.option(fc.constantFrom('Ashby elevator', 'Nowhere'), { nil: undefined }), async (text, kind, m, deliveryPoint) => {
        try {
          const out = await run(text, { kind, mapping: m, deliveryPoint });
          for (const e of out.errors) {
            expect(typeof e.message).toBe('string');
            expect(e.message.length).toBeGreaterThan(0);
            expect(e.row === null || (Number.isInteger(e.row) && e.row >= 1)).toBe(true);
            if (e.column !== null) expect(out.columns).toContain(e.column);
          }
          expect(out.validRows + new Set(out.errors.filter((e) => e.row !== null && e.row !== out.headerRow).map((e) => e.row)).size).toBeLessThanOrEqual(out.totalRows);
        } catch (err) {
          expect(err).toBeInstanceOf(ImportFileError);
          expect([400, 413, 422]).toContain((err as ImportFileError).status);
          expect((err as Error).message.length).toBeGreaterThan(0);
        }
      }),
      { numRuns: 400, seed: 1204 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
  });
});

describe('farm records far from the farm’s own history per hectare (issue 15)', () => {
  // F01 has harvested about 8 t of wheat per hectare (invented history: 7.5, 8 and 8.5 t/ha over three seasons).
  const history: Lookups = {
    ...lookups,
    recordHistory: { [`${id.farm('F01')}|${id.item('wheat')}`]: { perHa: 8, seasons: 3 }, [`${id.farm('F02')}|${id.item('wheat')}`]: { perHa: 8, seasons: 2 } },
    land: { [`${id.farm('F01')}|${id.season('2025/26')}`]: 150 },
  };
  const runRecords = (text: string) => validateImport(Buffer.from(text), { fileName: 'records.csv', kind: 'records' }, history);

  it('warns (an acceptable warning row) about 12,000 t on 150 ha and 120 t, not about 1,250 t; too short a history is not judged', async () => {
    const out = await runRecords(
      ['farm,season,item,quantity,unit,land_ha', 'F01,2025/26,wheat,12000,t,150', 'F01,2024/25,wheat,120,t,150', 'F01,2023/24,wheat,1250,t,150', 'F02,2025/26,wheat,12000,t,150'].join('\n'),
    );
    expect(out.errors).toEqual([]);
    expect(all(out.writes.records)).toHaveLength(4);
    expect(out.warningCount).toBe(2);
    expect(out.warnings).toEqual([
      { row: 2, column: 'quantity', message: "12,000 t of wheat on 150 ha is 80 t/ha, about 10 times F01's usual 8 t/ha (median of 3 seasons); is the decimal mark in the right place?" },
      { row: 3, column: 'quantity', message: "120 t of wheat on 150 ha is 0.8 t/ha, about 1/10 of F01's usual 8 t/ha (median of 3 seasons); is the decimal mark in the right place?" },
    ]);
  });

  it('takes the land from the database when the row gives none', async () => {
    const out = await runRecords('farm,season,item,quantity\nF01,2025/26,wheat,3700\nF01,2024/25,wheat,3700\n');
    // 2025/26 has 150 ha stored (24.7 t/ha, about 3.1 times); 2024/25 has no land, so it is not judged.
    expect(out.warnings.map((w) => [w.row, w.column])).toEqual([[2, 'quantity']]);
    expect(out.warnings[0].message).toMatch(/^3,700 t of wheat on 150 ha is 24\.67 t\/ha, about 3\.1 times F01's usual 8 t\/ha/);
  });
});
