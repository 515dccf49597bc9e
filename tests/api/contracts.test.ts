/**
 * Issue 19: forward delivery contracts as data. Planners and administrators keep them, the
 * treasurer reads them, a member sees only their own farm's (even asking for another farm by id or
 * filter); a stale save is refused with 409 and the stored row; every write is audited in words.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ContractRow } from '../../shared/contract-schemas.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
let planner: Awaited<ReturnType<typeof signedIn>>;
let ids: { wheat: number; nitrogen: number; season: number; own: number; other: number };

beforeAll(async () => {
  t = await startTestApp();
  planner = await signedIn(t.app, 'planner@example.org');
  const items = (await planner.get('/api/items')).body as { id: number; code: string }[];
  const seasons = (await planner.get('/api/seasons')).body as { id: number; label: string }[];
  const farms = (await planner.get('/api/farms')).body as { id: number; code: string }[];
  ids = {
    wheat: items.find((i) => i.code === 'wheat')!.id,
    nitrogen: items.find((i) => i.code === 'nitrogen')!.id,
    season: seasons.find((s) => s.label === '2026/27')!.id,
    own: farms.find((f) => f.code === 'F01')!.id,
    other: farms.find((f) => f.code === 'F02')!.id,
  };
});
afterAll(async () => t.close());

const body = (over: Record<string, unknown> = {}) => ({
  reference: 'T-0001',
  farmId: ids.own,
  seasonId: ids.season,
  itemId: ids.wheat,
  quantity: 600,
  price: 205,
  currency: 'EUR',
  deliveryFrom: '2026-08',
  deliveryTo: '2026-10',
  status: 'signed',
  ...over,
});

describe('contracts', () => {
  it('the demo co-op has invented contracts for the coming season, prices in whole cents', async () => {
    const rows = (await planner.get(`/api/contracts?seasons=${ids.season}`)).body as ContractRow[];
    expect(rows.length).toBeGreaterThanOrEqual(5);
    for (const r of rows) {
      expect(r.season).toBe('2026/27');
      expect(Number.isInteger(Math.round(r.price * 100))).toBe(true);
      expect(r.quantity).toBeGreaterThan(0);
    }
  });

  it('a planner records a contract; the price is stored in cents and read back as EUR per t', async () => {
    const res = await planner.post('/api/contracts').send(body({ price: 205.37 }));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ reference: 'T-0001', farmCode: 'F01', itemCode: 'wheat', unit: 't', quantity: 600, price: 205.37, status: 'signed', version: 1 });
    const stored = await t.database.db.execute(`select price_cents from contracts where reference = 'T-0001'`);
    expect((stored as unknown as { rows: { price_cents: number }[] }).rows[0].price_cents).toBe(20537);
  });

  it('bad input is refused naming the field; nothing is stored', async () => {
    const before = ((await planner.get('/api/contracts')).body as ContractRow[]).length;
    const cases: [Record<string, unknown>, string][] = [
      [{ reference: 'T-x1', quantity: -5 }, 'body.quantity'],
      [{ reference: 'T-x2', price: 205.001 }, 'body.price'],
      [{ reference: 'T-x3', deliveryFrom: '2026-11', deliveryTo: '2026-08' }, 'body.deliveryTo'],
      [{ reference: 'T-x4', deliveryFrom: '2026-13' }, 'body.deliveryFrom'],
      [{ reference: 'T-x5', status: 'pending' }, 'body.status'],
      [{ reference: 'T-x6', itemId: ids.nitrogen }, 'body.itemId'],
      [{ reference: 'T-x7', farmId: 999999 }, 'body.farmId'],
    ];
    for (const [over, path] of cases) {
      const res = await planner.post('/api/contracts').send(body(over));
      expect(res.status, JSON.stringify(over)).toBe(400);
      expect(res.body.error.details.map((d: { path: string }) => d.path)).toContain(path);
    }
    const dup = await planner.post('/api/contracts').send(body());
    expect(dup.status).toBe(409);
    expect(dup.body.error.message).toContain('T-0001');
    expect(((await planner.get('/api/contracts')).body as ContractRow[]).length).toBe(before);
  });

  it('a stale save is refused with 409 and the stored row; the fresh one wins', async () => {
    const [row] = (await planner.get('/api/contracts')).body.filter((r: ContractRow) => r.reference === 'T-0001') as ContractRow[];
    const first = await planner.put(`/api/contracts/${row.id}`).send({ ...body({ quantity: 650, price: 205.37 }), version: row.version });
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ quantity: 650, version: row.version + 1 });
    const late = await planner.put(`/api/contracts/${row.id}`).send({ ...body({ quantity: 700 }), version: row.version });
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('stale');
    expect(late.body.error.message).toContain('650 t of Wheat');
    const now = (await planner.get(`/api/contracts/${row.id}`)).body as ContractRow;
    expect(now.quantity).toBe(650);
  });

  it('changes are audited and described in words', async () => {
    const rows = (await planner.get('/api/audit?limit=5&entity=contract')).body.rows as { action: string; sentence: string; changes: { label: string; before: string; after: string }[] }[];
    const update = rows.find((r) => r.action === 'contract.update')!;
    expect(update.sentence).toMatch(/^Priya Planner changed delivery contract T-0001 \(Hollybrook Farm, Wheat, 2026\/27\)\.$/);
    expect(update.changes).toEqual([{ label: 'quantity', before: '600', after: '650' }]);
    const create = rows.find((r) => r.action === 'contract.create')!;
    expect(create.changes).toContainEqual({ label: 'price', before: '', after: '205.37' });
    expect(create.changes).toContainEqual({ label: 'farm', before: '', after: 'Hollybrook Farm' });
  });

  it('a member sees only their own farm, whatever they ask for; the treasurer reads but may not write', async () => {
    const member = await signedIn(t.app, 'member@example.org');
    const mine = (await member.get(`/api/contracts?farms=${ids.other}`)).body as ContractRow[];
    expect(mine.length).toBeGreaterThan(0);
    expect(new Set(mine.map((r) => r.farmCode))).toEqual(new Set(['F01']));
    const all = (await planner.get('/api/contracts')).body as ContractRow[];
    const foreign = all.find((r) => r.farmCode !== 'F01')!;
    expect((await member.get(`/api/contracts/${foreign.id}`)).status).toBe(404);
    expect((await member.post('/api/contracts').send(body({ reference: 'T-m' }))).status).toBe(403);

    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    expect(((await treasurer.get('/api/contracts')).body as ContractRow[]).length).toBe(all.length);
    expect((await treasurer.put(`/api/contracts/${foreign.id}`).send({ ...body(), version: foreign.version })).status).toBe(403);
  });

  it('an administrator may delete a contract; the deletion is audited', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const [row] = ((await admin.get('/api/contracts')).body as ContractRow[]).filter((r) => r.reference === 'T-0001');
    expect((await admin.delete(`/api/contracts/${row.id}`)).status).toBe(204);
    expect((await admin.get(`/api/contracts/${row.id}`)).status).toBe(404);
    const [last] = (await admin.get('/api/audit?limit=1')).body.rows;
    expect(last).toMatchObject({ action: 'contract.delete', sentence: 'Alex Admin removed delivery contract T-0001 (Hollybrook Farm, Wheat, 2026/27).' });
  });
});
