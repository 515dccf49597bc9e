import ExcelJS from 'exceljs';
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

type Row = { id: number; itemId: number; itemName: string; itemCode: string; season: string; deliveryPoint: string; price: number; source: string; observedOn: string };

describe('price pages (GET /api/prices: a window, sorted and narrowed on the server)', () => {
  it('offset and limit cut the table into windows that add up to it, with the total in X-Total-Count', async () => {
    const planner = await plannerAgent();
    const all = await planner.get('/api/prices');
    const rows = all.body as Row[];
    const total = Number(all.headers['x-total-count']);
    // The demo co-op stores 320 prices (seed/demo-coop.ts); earlier tests here add a few.
    expect(total).toBe(rows.length);
    expect(total).toBeGreaterThanOrEqual(320);
    const pages: Row[] = [];
    for (let offset = 0; offset < total; offset += 100) {
      const page = await planner.get(`/api/prices?offset=${offset}&limit=100`);
      expect(page.status).toBe(200);
      expect(page.headers['x-total-count']).toBe(String(total));
      expect(page.body).toHaveLength(Math.min(100, total - offset));
      pages.push(...(page.body as Row[]));
    }
    expect(pages.map((r) => r.id)).toEqual(rows.map((r) => r.id));
    // Past the end: no rows, the same total.
    const beyond = await planner.get(`/api/prices?offset=${total + 5}&limit=10`);
    expect(beyond.body).toEqual([]);
    expect(beyond.headers['x-total-count']).toBe(String(total));
  });

  it('sorts by a column either way, ties in the table order', async () => {
    const planner = await plannerAgent();
    const all = (await planner.get('/api/prices')).body as Row[];
    const byPrice = (await planner.get('/api/prices?sort=price&dir=desc&limit=1000')).body as Row[];
    expect(byPrice.map((r) => r.price)).toEqual(all.map((r) => r.price).sort((a, b) => b - a));
    const top = (await planner.get('/api/prices?sort=price&dir=desc&limit=3')).body as Row[];
    expect(top.map((r) => r.id)).toEqual(byPrice.slice(0, 3).map((r) => r.id));
    const byItem = (await planner.get('/api/prices?sort=itemId&limit=1000')).body as Row[];
    const names = byItem.map((r) => r.itemName);
    expect(names).toEqual([...names].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0)));
    expect(names[0]).toBe('Canola (rapeseed)');
    const byDate = (await planner.get('/api/prices?sort=observedOn&dir=asc&limit=1')).body as Row[];
    expect(byDate[0].observedOn).toBe(all.map((r) => r.observedOn).sort()[0]);
  });

  it('narrows by the grid\'s text and number conditions and by a search over every text column', async () => {
    const planner = await plannerAgent();
    const all = (await planner.get('/api/prices')).body as Row[];
    const check = async (query: string, keep: (r: Row) => boolean) => {
      const res = await planner.get(`/api/prices?${query}&limit=1000`);
      expect(res.status, query).toBe(200);
      const want = all.filter(keep);
      expect(want.length, query).toBeGreaterThan(0);
      expect((res.body as Row[]).map((r) => r.id), query).toEqual(want.map((r) => r.id));
      expect(res.headers['x-total-count'], query).toBe(String(want.length));
    };
    await check('item=equals:wheat', (r) => r.itemName === 'Wheat');
    await check('item=contains:RAPE', (r) => r.itemName.includes('rapeseed'));
    await check('season=equals:2024/25', (r) => r.season === '2024/25');
    await check('deliveryPoint=startsWith:ash', (r) => r.deliveryPoint.startsWith('Ashby'));
    await check('source=notContains:harvest', (r) => !r.source.includes('harvest'));
    await check('source=endsWith:(spring)', (r) => r.source.endsWith('(spring)'));
    await check('price=greaterThan:300', (r) => r.price > 300);
    await check('price=inRange:150:200', (r) => r.price >= 150 && r.price <= 200);
    await check('price=lessThanOrEqual:1', (r) => r.price <= 1);
    await check('q=millbrook', (r) => r.deliveryPoint === 'Millbrook store');
    await check('q=autumn', (r) => r.source.includes('autumn'));
    await check('q=wheat%20LARKFIELD%202024-08', (r) => r.itemName === 'Wheat' && r.deliveryPoint === 'Larkfield terminal' && r.observedOn.startsWith('2024-08'));
    await check(`items=${all.find((r) => r.itemName === 'Diesel')!.itemId}&price=greaterThan:0.5`, (r) => r.itemName === 'Diesel' && r.price > 0.5);
    // A % in a condition is a percent sign, not a wildcard.
    const none = await planner.get('/api/prices?source=contains:%25');
    expect(none.body).toEqual([]);
    expect(none.headers['x-total-count']).toBe('0');
  });

  it('refuses bad paging, sorting and filtering parameters with a 400 naming each', async () => {
    const planner = await plannerAgent();
    const refused = async (query: string) => {
      const res = await planner.get(`/api/prices?${query}`);
      expect(res.status, query).toBe(400);
      return res.body.error.details as { path: string; message: string }[];
    };
    expect(await refused('limit=0')).toEqual([{ path: 'query.limit', message: 'Send limit as a whole number from 1 to 1,000' }]);
    expect(await refused('limit=5000')).toEqual([{ path: 'query.limit', message: 'Send limit as a whole number from 1 to 1,000' }]);
    expect(await refused('offset=-1')).toEqual([{ path: 'query.offset', message: 'Send offset as a whole number from 0 to 100,000,000' }]);
    expect(await refused('offset=ten&limit=2.5')).toEqual([
      { path: 'query.offset', message: 'Send offset as a whole number from 0 to 100,000,000' },
      { path: 'query.limit', message: 'Send limit as a whole number from 1 to 1,000' },
    ]);
    expect(await refused('limit=10&limit=20')).toEqual([{ path: 'query.limit', message: 'Send limit as a whole number from 1 to 1,000' }]);
    expect(await refused('sort=colour')).toEqual([{ path: 'query.sort', message: 'Sort by one of itemId, seasonId, deliveryPointId, price, currency, source, observedOn' }]);
    expect(await refused('sort=price&dir=up')).toEqual([{ path: 'query.dir', message: 'Send dir as asc or desc' }]);
    expect(await refused('item=wheat')).toEqual([
      { path: 'query.item', message: 'Write a text condition as comparison:text, the comparison one of contains, notContains, equals, notEqual, startsWith, endsWith (e.g. contains:wheat)' },
    ]);
    const price = await refused('price=above:5');
    expect(price).toEqual([
      {
        path: 'query.price',
        message: 'Write a price condition as comparison:number (decimal point), the comparison one of equals, notEqual, lessThan, lessThanOrEqual, greaterThan, greaterThanOrEqual, inRange (e.g. greaterThan:200 or inRange:100:250)',
      },
    ]);
    expect((await refused('price=inRange:100'))[0].message).toMatch(/^inRange needs two numbers: inRange:from:to/);
    expect((await refused('price=greaterThan:204,5'))[0].path).toBe('query.price');
  });
});

describe('exports in the co-op\'s decimal convention', () => {
  it('with a decimal comma the price CSV separates cells by semicolons and writes 204,5; XLSX keeps real numbers; both stream every row', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const planner = await plannerAgent();
    const settings = (await admin.get('/api/settings')).body;
    const rows = (await planner.get('/api/prices')).body as Row[];
    const point = await planner.get('/api/prices/export?format=csv');
    expect(point.text.split('\r\n')[0]).toBe('\uFEFFitem,season,delivery_point,price,unit,currency,source,observed_on');
    expect(point.text).toContain('\r\nwheat,2006/07,Larkfield terminal,166.11,t,EUR,Co-op grain desk harvest bid,2006-08-15\r\n');
    try {
      expect((await admin.put('/api/settings').send({ ...settings, decimalMark: 'comma' })).status).toBe(200);
      const comma = await planner.get('/api/prices/export?format=csv');
      expect(comma.status).toBe(200);
      const lines = comma.text.split('\r\n');
      expect(lines[0]).toBe('\uFEFFitem;season;delivery_point;price;unit;currency;source;observed_on');
      expect(lines).toContain('wheat;2006/07;Larkfield terminal;166,11;t;EUR;Co-op grain desk harvest bid;2006-08-15');
      expect(lines.filter((l) => l !== '')).toHaveLength(rows.length + 1);
      const xlsx = await planner.get('/api/prices/export?format=xlsx').buffer(true).parse((res, done) => {
        const parts: Buffer[] = [];
        res.on('data', (c: Buffer) => parts.push(c));
        res.on('end', () => done(null, Buffer.concat(parts)));
      });
      const wb = new ExcelJS.Workbook();
      await wb.xlsx.load(xlsx.body as never);
      const ws = wb.worksheets[0];
      expect(ws.rowCount).toBe(rows.length + 1);
      expect(ws.getRow(2).getCell(3).value).toBe('Ashby elevator');
      expect(ws.getRow(2).getCell(4).value).toBe(166.9);
      expect(ws.getRow(2).getCell(8).value).toEqual(new Date(Date.UTC(2006, 7, 15)));
      const records = await planner.get('/api/records/export?format=csv');
      expect(records.text.split('\r\n')[0]).toBe('\uFEFFfarm;season;item;quantity;unit;land_ha');
      expect(records.text).toMatch(/\r\nF01;2006\/07;[a-z]+;\d+(,\d+)?;/);
    } finally {
      await admin.put('/api/settings').send(settings);
    }
  });
});

describe('co-op summary', () => {
  it('counts the seasons that hold data, and names a season opened ahead without data apart', async () => {
    const planner = await plannerAgent();
    const before = (await planner.get('/api/summary')).body as { seasons: { count: number; first: string; last: string; opened: string[] }; recordGaps: unknown[] };
    // The demo co-op (seed/): 20 seasons of prices and farm records, 2006/07 to 2025/26, and the
    // coming season 2026/27 opened ahead for its delivery contracts (seed/demo-contracts.ts).
    expect(before.seasons).toEqual({ count: 20, first: '2006/07', last: '2025/26', opened: ['2026/27'] });
    expect((await planner.post('/api/seasons').send({ label: '2031/32', startYear: 2031, startMonth: 7 })).status).toBe(201);
    const after = (await planner.get('/api/summary')).body as typeof before;
    expect(after.seasons).toEqual({ count: 20, first: '2006/07', last: '2025/26', opened: ['2026/27', '2031/32'] });
    // A season without records after the last recorded one is not a gap.
    expect(after.recordGaps).toEqual(before.recordGaps);
    // Nor do the price series run on into it.
    const series = (await planner.get('/api/prices/series')).body as { seasons: string[] };
    expect(series.seasons).toHaveLength(20);
    expect([series.seasons[0], series.seasons.at(-1)]).toEqual(['2006/07', '2025/26']);
  });
});
