/**
 * Issue 19: delivery contracts imported from CSV and XLSX through the one import machinery (kind
 * `contracts`): row-level checks naming row and column, nothing written while a row is wrong, the
 * contract number as natural key (a re-import updates), and one audit entry per import.
 */
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ContractRow } from '../../shared/contract-schemas.js';
import { closeValidationPool } from '../../server/imports/validation-pool.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { commitImport, uploadImport } from './import-steps.js';

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

const upload = (file: Buffer | string, fileName: string) => uploadImport(planner, 'contracts', file, fileName);
const commit = (id: number, onExisting: 'update' | 'skip') => commitImport(planner, id, onExisting);

const contracts = async () => ((await planner.get('/api/contracts')).body as ContractRow[]).filter((c) => c.reference.startsWith('IMP-'));

describe('contract imports', () => {
  it('a file with mistakes: each wrong row is named with its column, and the commit is refused', async () => {
    const csv = [
      'contract number,farm,season,item,quantity,price (EUR/t),from,to,status',
      'IMP-1,F01,2026/27,wheat,600,205,2026-08,2026-10,signed',
      'IMP-2,F99,2026/27,wheat,100,200,2026-08,2026-10,signed',
      'IMP-3,F02,2026/27,nitrogen,100,200,2026-08,2026-10,signed',
      'IMP-4,F02,2026/27,wheat,-5,200,2026-08,2026-10,signed',
      'IMP-5,F02,2026/27,wheat,100,200.555,2026-08,2026-10,signed',
      'IMP-6,F02,2026/27,wheat,100,200,2026-11,2026-08,signed',
      'IMP-7,F02,2026/27,wheat,100,200,Aug 2026,2026-10,signed',
      'IMP-8,F02,2026/27,wheat,100,200,2026-08,2026-10,pending',
      'IMP-1,F02,2026/27,canola,50,400,2026-08,2026-09,offered',
    ].join('\n');
    const res = await upload(csv, 'contracts.csv');
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ kind: 'contracts', totalRows: 9, validRows: 1 });
    const where = (res.body.errors as { row: number; column: string | null; message: string }[]).map((e) => `${e.row}|${e.column}|${e.message}`);
    expect(where).toEqual([
      '3|farm|unknown farm "F99": no farm has this code',
      '4|item|nitrogen is an input; a contract commits an output',
      '5|quantity|"-5" is negative: quantities are 0 or more, inputs too (the column or the item says whether it is an input)',
      '6|price (EUR/t)|"200.555" has more than two decimals (cents)',
      '7|to|the last delivery month 2026-08 is before the first, 2026-11',
      '8|from|"Aug 2026" is not a month: write the first delivery month as YYYY-MM, e.g. 2026-08',
      '9|status|unknown status "pending" (statuses: offered, signed, delivered, cancelled)',
      '10|null|the row repeats row 2 (same contract number)',
    ]);
    const refused = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'update' });
    expect(refused.status).toBe(409);
    expect(await contracts()).toEqual([]);
  });

  it('a clean XLSX workbook commits; the price header names the currency; the import is audited', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Contracts');
    ws.addRow(['Contract number', 'Farm', 'Season', 'Item', 'Quantity (t)', 'Contract price (EUR/t)', 'First delivery month', 'Last delivery month', 'Status']);
    ws.addRow(['IMP-10', 'F01', '2026/27', 'wheat', 600, 205, '2026-08', '2026-10', 'signed']);
    ws.addRow(['IMP-11', 'F02', '2026/27', 'canola', 80, 410.5, '2026-08', '2026-09', 'offered']);
    const res = await upload(Buffer.from(await wb.xlsx.writeBuffer()), 'contracts.xlsx');
    expect(res.status).toBe(201);
    expect(res.body.errors).toEqual([]);
    expect(res.body).toMatchObject({ format: 'xlsx', errorCount: 0, toWrite: { contracts: 2 }, existing: { contracts: 0 } });
    const done = await commit(res.body.id, 'update');
    expect(done.body).toMatchObject({ status: 'committed', counts: { inserted: 2, updated: 0, skipped: 0 } });
    const rows = await contracts();
    expect(rows.map((r) => [r.reference, r.farmCode, r.itemCode, r.quantity, r.price, r.currency, r.deliveryFrom, r.deliveryTo, r.status, r.version])).toEqual([
      ['IMP-10', 'F01', 'wheat', 600, 205, 'EUR', '2026-08', '2026-10', 'signed', 1],
      ['IMP-11', 'F02', 'canola', 80, 410.5, 'EUR', '2026-08', '2026-09', 'offered', 1],
    ]);
    const audit = (await planner.get('/api/audit?limit=5&entity=contract')).body.rows as { action: string }[];
    expect(audit[0]).toMatchObject({ action: 'contract.import' });
  });

  it('re-importing a contract number updates that contract (or skips it), raising its version', async () => {
    const csv = 'reference,farm,season,item,quantity,price,delivery_from,delivery_to,status\nIMP-10,F01,2026/27,wheat,650,207.25,2026-08,2026-11,signed\nIMP-12,F03,2026/27,wheat,300,199,2026-09,2026-10,\n';
    const skip = await upload(csv, 'again.csv');
    expect(skip.body).toMatchObject({ errorCount: 0, toWrite: { contracts: 2 }, existing: { contracts: 1 } });
    expect(skip.body.notes).toContain('Contracts without a status are stored as signed.');
    const skipped = await commit(skip.body.id, 'skip');
    expect(skipped.body.counts).toEqual({ inserted: 1, updated: 0, skipped: 1 });
    expect((await contracts()).find((r) => r.reference === 'IMP-12')).toMatchObject({ status: 'signed', quantity: 300 });
    const again = await upload(csv.replace('IMP-12', 'IMP-13'), 'again2.csv');
    const updated = await commit(again.body.id, 'update');
    expect(updated.body.counts).toEqual({ inserted: 1, updated: 1, skipped: 0 });
    expect((await contracts()).find((r) => r.reference === 'IMP-10')).toMatchObject({ quantity: 650, price: 207.25, deliveryTo: '2026-11', version: 2 });
  });
});
