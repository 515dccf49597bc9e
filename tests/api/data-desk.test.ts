import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

/** One planner session for the tests that need nothing else (sign-ins are rate-limited per address). */
let planner$: ReturnType<typeof signedIn> | undefined;
const plannerAgent = () => (planner$ ??= signedIn(t.app, 'planner@example.org'));

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
      version: full.version,
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

  it('deleting chosen rows is all or nothing: one id already gone keeps every row', async () => {
    const planner = await plannerAgent();
    const k = await ids(planner);
    const row = { itemId: k.item('wheat'), seasonId: k.season('2025/26'), deliveryPointId: k.dp('Ashby elevator'), price: 250, currency: 'EUR', source: 'delete test', observedOn: '2025-10-20' };
    const made = (await planner.post('/api/prices').send({ rows: [row, { ...row, observedOn: '2025-10-21' }, { ...row, observedOn: '2025-10-22' }] })).body as { id: number }[];
    const count = (await planner.get('/api/prices')).body.length;
    const refused = await planner.post('/api/prices/deletions').send({ ids: [made[0]!.id, 999_999, made[1]!.id] });
    expect(refused.status).toBe(404);
    expect(refused.body.error.message).toBe('Price 999999 was not found (deleted meanwhile?); nothing was deleted');
    expect((await planner.get('/api/prices')).body.length).toBe(count);
    expect((await planner.post('/api/prices/deletions').send({ ids: [made[0]!.id, made[0]!.id] })).status).toBe(400);
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    expect((await treasurer.post('/api/prices/deletions').send({ ids: [made[0]!.id] })).status).toBe(403);
    const done = await planner.post('/api/prices/deletions').send({ ids: made.map((m) => m.id) });
    expect(done.body).toEqual({ deleted: 3 });
    expect((await planner.get('/api/prices')).body.length).toBe(count - 3);
    const audit = (await planner.get('/api/audit?entity=price')).body.rows ?? (await planner.get('/api/audit?entity=price')).body;
    const entry = (audit as { action: string; entityId: string; before: { id: number }[] }[]).find((a) => a.action === 'price.delete' && a.entityId === made.map((m) => m.id).join(','));
    expect(entry?.before.map((b) => b.id)).toEqual(made.map((m) => m.id));
  });

  it('a price index is corrected in place: name, base, source and values replaced together', async () => {
    const planner = await plannerAgent();
    const k = await ids(planner);
    const created = await planner.post('/api/price-indexes').send({ name: 'Test index', base: '2015/16 = 100', source: 'Invented for a test', values: [{ seasonId: k.season('2015/16'), value: 100 }, { seasonId: k.season('2016/17'), value: 103 }] });
    expect(created.status).toBe(201);
    const fixed = await planner.put(`/api/price-indexes/${created.body.id}`).send({ name: 'Test index (revised)', base: '2015/16 = 100', source: 'Invented, revised', values: [{ seasonId: k.season('2015/16'), value: 100 }, { seasonId: k.season('2016/17'), value: 102.5 }, { seasonId: k.season('2017/18'), value: 104 }] });
    expect(fixed.status).toBe(200);
    expect(fixed.body).toMatchObject({ id: created.body.id, name: 'Test index (revised)', source: 'Invented, revised' });
    expect(fixed.body.values.map((v: { season: string; value: number }) => [v.season, v.value])).toEqual([['2015/16', 100], ['2016/17', 102.5], ['2017/18', 104]]);
    // A bad value refuses the whole change.
    const bad = await planner.put(`/api/price-indexes/${created.body.id}`).send({ ...fixed.body, values: [{ seasonId: k.season('2015/16'), value: -1 }] });
    expect(bad.status).toBe(400);
    expect((await planner.get('/api/price-indexes')).body.find((i: { id: number }) => i.id === created.body.id).values).toHaveLength(3);
    expect((await planner.put('/api/price-indexes/999999').send(fixed.body)).status).toBe(404);
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

describe('fixed factors other than land', () => {
  it('a planner records a factor per farm and season; a model uses it and leaves out the seasons without it', async () => {
    const planner = await plannerAgent();
    const k = await ids(planner);
    const farms = (await planner.get('/api/farms')).body as { id: number; code: string }[];
    const seasons = ['2016/17', '2017/18', '2018/19', '2019/20', '2020/21', '2021/22', '2022/23', '2023/24', '2024/25'];
    // Every farm has an irrigated area in those seasons except F02 in 2024/25 (invented values).
    for (const [fi, f] of farms.entries())
      for (const [si, label] of seasons.entries()) {
        if (f.code === 'F02' && label === '2024/25') continue;
        const res = await planner.put('/api/records/factors').send({ farmId: f.id, seasonId: k.season(label), factor: 'irrigated_ha', value: 20 + ((fi * 7 + si * 3) % 40) });
        expect(res.status, JSON.stringify(res.body)).toBe(200);
      }
    const f1 = farms.find((f) => f.code === 'F01')!;
    const listed = (await planner.get(`/api/records/factors?farms=${f1.id}`)).body as { factor: string; season: string; value: number }[];
    expect(listed.filter((r) => r.factor === 'irrigated_ha')).toHaveLength(9);
    expect(listed.some((r) => r.factor === 'land_ha')).toBe(true);
    expect((await planner.get('/api/records/factor-names')).body).toEqual([
      { factor: 'irrigated_ha', farms: 20, seasons: 9 },
      { factor: 'land_ha', farms: 20, seasons: 20 },
    ]);

    // Names and values are checked; the member reads only their own farm's factors, and writes nothing.
    const bad = await planner.put('/api/records/factors').send({ farmId: f1.id, seasonId: k.season('2016/17'), factor: 'Irrigated ha', value: -3 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['body.factor', 'body.value']);
    expect((await planner.put('/api/records/factors').send({ farmId: f1.id, seasonId: k.season('2016/17'), factor: 'land_ha', value: 0 })).status).toBe(400);
    const member = await signedIn(t.app, 'member@example.org');
    const own = (await member.get(`/api/records/factors?farms=${farms.find((f) => f.code === 'F02')!.id}`)).body as { farmCode: string }[];
    expect(new Set(own.map((r) => r.farmCode))).toEqual(new Set(['F01']));
    expect((await member.put('/api/records/factors').send({ farmId: f1.id, seasonId: k.season('2016/17'), factor: 'irrigated_ha', value: 1 })).status).toBe(403);

    const model = await planner.post('/api/models').send({
      name: 'Land and irrigation',
      definition: { items: ['wheat', 'canola', 'nitrogen', 'diesel', 'labour'], numeraire: 'labour', fixedFactors: ['land_ha', 'irrigated_ha'], fromSeason: '2016/17', toSeason: '2024/25', backtestSeasons: 0 },
    });
    expect(model.status, JSON.stringify(model.body)).toBe(201);
    const run = await planner.post(`/api/models/${model.body.id}/runs`).send({});
    expect(run.status, JSON.stringify(run.body)).toBe(202);
    const { dataset } = (await planner.get(`/api/model-runs/${run.body.id}/dataset`)).body;
    expect(dataset.fixedFactors).toEqual(['land_ha', 'irrigated_ha']);
    expect(dataset.fixed[1]).toHaveLength(dataset.seasons.length);
    const f02in2024 = dataset.farms.some((f: string, i: number) => f === 'F02' && dataset.seasons[i] === '2024/25');
    expect(f02in2024).toBe(false);
    const excluded = (await planner.get(`/api/model-runs/${run.body.id}`)).body.excluded as { farm: string; season: string; reason: string }[];
    expect(excluded).toContainEqual({ farm: 'F02', season: '2024/25', reason: 'no irrigated_ha recorded' });

    // A factor nobody recorded is refused when the run starts, naming the field.
    const none = await planner.post('/api/models').send({ name: 'Unknown factor', definition: { items: ['wheat', 'labour'], numeraire: 'labour', fixedFactors: ['drainage_ha'] } });
    const refused = await planner.post(`/api/models/${none.body.id}/runs`).send({});
    expect(refused.status).toBe(400);
    expect(refused.body.error.message).toBe('No farm in the sample has a recorded value of drainage_ha');

    // Removing a value.
    expect((await planner.delete('/api/records/factors').send({ farmId: f1.id, seasonId: k.season('2016/17'), factor: 'irrigated_ha' })).status).toBe(204);
    expect((await planner.delete('/api/records/factors').send({ farmId: f1.id, seasonId: k.season('2016/17'), factor: 'irrigated_ha' })).status).toBe(404);
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

describe('co-op summary', () => {
  it('counts the seasons that hold data, and names a season opened ahead without data apart', async () => {
    const planner = await plannerAgent();
    const before = (await planner.get('/api/summary')).body as { seasons: { count: number; first: string; last: string; opened: string[] }; recordGaps: unknown[] };
    // The demo co-op (seed/): 20 seasons of prices and farm records, 2006/07 to 2025/26.
    expect(before.seasons).toEqual({ count: 20, first: '2006/07', last: '2025/26', opened: [] });
    expect((await planner.post('/api/seasons').send({ label: '2031/32', startYear: 2031, startMonth: 7 })).status).toBe(201);
    const after = (await planner.get('/api/summary')).body as typeof before;
    expect(after.seasons).toEqual({ count: 20, first: '2006/07', last: '2025/26', opened: ['2031/32'] });
    // A season without records after the last recorded one is not a gap.
    expect(after.recordGaps).toEqual(before.recordGaps);
    // Nor do the price series run on into it.
    const series = (await planner.get('/api/prices/series')).body as { seasons: string[] };
    expect(series.seasons).toHaveLength(20);
    expect([series.seasons[0], series.seasons.at(-1)]).toEqual(['2006/07', '2025/26']);
  });
});
