import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

async function ids(a: Awaited<ReturnType<typeof signedIn>>) {
  const items = (await a.get('/api/items')).body as { id: number; code: string }[];
  const seasons = (await a.get('/api/seasons')).body as { id: number; label: string }[];
  const dps = (await a.get('/api/delivery-points')).body as { id: number; name: string }[];
  return {
    item: (c: string) => items.find((i) => i.code === c)!.id,
    season: (l: string) => seasons.find((s) => s.label === l)!.id,
    dp: (n: string) => dps.find((d) => d.name === n)!.id,
  };
}

describe('items', () => {
  it('a planner adds a fertiliser product with its analysis; a treasurer may not', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const urea = { code: 'urea', name: 'Urea', role: 'input', category: 'fertiliser', unit: 't', nPct: 46, p2o5Pct: 0, k2oPct: 0 };
    const res = await planner.post('/api/items').send(urea);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject(urea);
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    expect((await treasurer.post('/api/items').send({ ...urea, code: 'urea2' })).status).toBe(403);
    expect((await planner.post('/api/items').send(urea)).status).toBe(409);
  });

  it('an analysis above 100 % names the field', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const res = await planner.post('/api/items').send({ code: 'bad', name: 'Bad', role: 'input', category: 'fertiliser', unit: 't', nPct: 146 });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([{ path: 'body.nPct', message: 'A percentage cannot exceed 100' }]);
  });

  it('deleting an item that has prices answers 409 and keeps it', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const id = (await ids(planner)).item('wheat');
    const res = await planner.delete(`/api/items/${id}`);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('in_use');
    expect((await planner.get('/api/items')).body.some((i: { code: string }) => i.code === 'wheat')).toBe(true);
  });
});

describe('prices', () => {
  it('editing a price changes the series the chart reads and is audited', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const k = await ids(planner);
    const wheat = k.item('wheat');
    const rows = (await planner.get(`/api/prices?items=${wheat}&seasons=${k.season('2015/16')}`)).body as { id: number; price: number; deliveryPoint: string }[];
    expect(rows).toHaveLength(3);
    const before = (await planner.get(`/api/prices/series?items=${wheat}`)).body;
    const idx = before.seasons.indexOf('2015/16');
    const mean = rows.reduce((s, r) => s + r.price, 0) / 3;
    expect(before.series[0].values[idx]).toBeCloseTo(mean, 9);
    const target = rows[0];
    const full = (await planner.get(`/api/prices?items=${wheat}`)).body.find((r: { id: number }) => r.id === target.id);
    const put = await planner.put(`/api/prices/${target.id}`).send({
      itemId: full.itemId,
      seasonId: full.seasonId,
      deliveryPointId: full.deliveryPointId,
      price: target.price + 30,
      currency: full.currency,
      source: full.source,
      observedOn: full.observedOn,
    });
    expect(put.status).toBe(200);
    expect(put.body.price).toBe(target.price + 30);
    const after = (await planner.get(`/api/prices/series?items=${wheat}`)).body;
    expect(after.series[0].values[idx]).toBeCloseTo(mean + 10, 9);
    const audit = (await planner.get('/api/audit?limit=1')).body.rows[0];
    expect(audit).toMatchObject({ action: 'price.update', entity: 'price', entityId: String(target.id), actorEmail: 'planner@example.org' });
    expect(audit.before.price).toBe(target.price);
    expect(audit.after.price).toBe(target.price + 30);
  });

  it('the deflated series is nominal / index × 100', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const k = await ids(planner);
    const [ix] = (await planner.get('/api/price-indexes')).body;
    const nominal = (await planner.get(`/api/prices/series?items=${k.item('nitrogen')}`)).body;
    const real = (await planner.get(`/api/prices/series?items=${k.item('nitrogen')}&deflator=${ix.id}`)).body;
    expect(real.deflator).toEqual({ name: ix.name, base: ix.base });
    ix.values.forEach((v: { season: string; value: number }) => {
      const i = nominal.seasons.indexOf(v.season);
      expect(real.series[0].values[i]).toBeCloseTo((nominal.series[0].values[i] / v.value) * 100, 9);
    });
  });

  it('a pasted block with one bad row writes nothing and names the row and field', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const k = await ids(planner);
    const count = (await planner.get('/api/prices')).body.length;
    const row = { itemId: k.item('canola'), seasonId: k.season('2025/26'), deliveryPointId: k.dp('Ashby elevator'), price: 400, currency: 'EUR', source: 'paste', observedOn: '2025-09-01' };
    const res = await planner.post('/api/prices').send({ rows: [row, { ...row, observedOn: '2025-09-02', price: -5 }] });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([{ path: 'body.rows.1.price', message: 'A price must be more than 0' }]);
    expect((await planner.get('/api/prices')).body.length).toBe(count);
    const ok = await planner.post('/api/prices').send({ rows: [row, { ...row, observedOn: '2025-09-02' }] });
    expect(ok.status).toBe(201);
    expect(ok.body).toHaveLength(2);
    expect((await planner.get('/api/prices')).body.length).toBe(count + 2);
  });

  it('a member cannot read the price table', async () => {
    const member = await signedIn(t.app, 'member@example.org');
    expect((await member.get('/api/prices')).status).toBe(403);
  });
});

describe('farm records', () => {
  it('a member reads only their own farm even when asking for another', async () => {
    const member = await signedIn(t.app, 'member@example.org');
    const planner = await signedIn(t.app, 'planner@example.org');
    const farms = (await planner.get('/api/farms')).body as { id: number; code: string }[];
    const other = farms.find((f) => f.code === 'F02')!.id;
    const res = await member.get(`/api/records?farms=${other}`);
    expect(res.status).toBe(200);
    expect(new Set(res.body.map((r: { farmCode: string }) => r.farmCode))).toEqual(new Set(['F01']));
    const land = await member.get(`/api/records/land?farms=${other}`);
    expect(new Set(land.body.map((r: { farmCode: string }) => r.farmCode))).toEqual(new Set(['F01']));
    expect((await member.put('/api/records').send({ rows: [{ farmId: other, seasonId: 1, itemId: 1, quantity: 1 }] })).status).toBe(403);
  });

  it('a planner replaces a quantity and the audit keeps old → new', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const [first] = (await planner.get('/api/records')).body;
    const res = await planner.put('/api/records').send({ rows: [{ farmId: first.farmId, seasonId: first.seasonId, itemId: first.itemId, quantity: 1234.5 }] });
    expect(res.status).toBe(200);
    expect(res.body.find((r: { itemId: number }) => r.itemId === first.itemId).quantity).toBe(1234.5);
    const audit = (await planner.get('/api/audit?limit=1')).body.rows[0];
    expect(audit.before.quantity).toBe(first.quantity);
    expect(audit.after.quantity).toBe(1234.5);
  });
});

describe('exports', () => {
  it('a planner exports prices as CSV with one row per observation', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const count = (await planner.get('/api/prices')).body.length;
    const res = await planner.get('/api/prices/export?format=csv');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const lines = res.text.trim().split(/\r?\n/);
    expect(lines.length).toBe(count + 1);
  });

  it("a member's record export holds only their own farm", async () => {
    const member = await signedIn(t.app, 'member@example.org');
    const res = await member.get('/api/records/export?format=csv');
    expect(res.status).toBe(200);
    const lines = res.text.trim().split(/\r?\n/).slice(1);
    expect(lines.length).toBeGreaterThan(0);
    expect(lines.every((l) => l.startsWith('F01,'))).toBe(true);
  });
});
