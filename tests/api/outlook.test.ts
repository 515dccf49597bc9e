import { eq, sql } from 'drizzle-orm';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mailOutbox, outlookVersionFarms, outlookVersions, users } from '../../server/db/schema/index.js';
import { buildDemoCoop } from '../../seed/demo-coop.js';
import { projectForecast } from '../../server/estimation/index.js';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';
import { demoModel } from '../../seed/demo-model.js';
import { sleep, until } from '../polling.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;

let t: TestApp;
let planner: Agent;
let member: Agent;
let runId: number;
let outlookId: number;
const demo = buildDemoCoop();
const memberEmails = demo.farms.map((f) => f.ownerEmail);

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
async function project(id: number) {
  const started = await planner.post(`/api/outlooks/${id}/projection`);
  expect(started.status).toBe(202);
  const done = await until('the projection', async () => {
    const p = (await planner.get(`/api/outlooks/${id}/projection`)).body;
    return p.status === 'succeeded' || p.status === 'failed' ? p : undefined;
  }, 60_000);
  expect(done.error).toBeNull();
  expect(done.status).toBe('succeeded');
  return done.result;
}

beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
  member = await signedIn(t.app, 'member@example.org');
  // One fit for the whole file: the demo's items with land and trend, fitted to 2006/07–2024/25 so
  // that 2025/26 can be set against its records; no back-test (speed).
  const model = await planner.post('/api/models').send({
    name: 'Outlook model',
    definition: demoModel({ toSeason: '2024/25', backtestSeasons: 0 }),
  });
  expect(model.status).toBe(201);
  const run = await planner.post(`/api/models/${model.body.id}/runs`);
  runId = run.body.id;
  const status = await until('the fit', async () => {
    const s = (await planner.get(`/api/model-runs/${runId}/status`)).body;
    return ['succeeded', 'failed', 'cancelled'].includes(s.status) ? s : undefined;
  }, 60_000);
  expect(status.status).toBe('succeeded');
}, 120_000);
afterAll(async () => t?.close());

describe('price expectations', () => {
  it('a planner opens the 2026/27 outlook (creating the season) and sets an expected price per item by several methods', async () => {
    const created = await planner.post('/api/outlooks').send({ season: '2026/27', modelRunId: runId });
    expect(created.status).toBe(201);
    outlookId = created.body.id;
    expect(created.body.season).toBe('2026/27');
    // Defaults: last season's price for every item of the model.
    expect(created.body.expectations.map((e: { item: string }) => e.item).sort()).toEqual(['canola', 'diesel', 'labour', 'nitrogen', 'phosphate', 'potash', 'wheat']);
    const seasons = (await planner.get('/api/seasons')).body as { id: number; label: string; startYear: number }[];
    const next = seasons.find((s) => s.label === '2026/27')!;
    expect(next).toMatchObject({ startYear: 2026 });
    expect((await planner.post('/api/outlooks').send({ season: '2026/27' })).status).toBe(409);

    // Futures history for wheat: a quote per past season and the new-crop quote for 2026/27.
    const itemsList = (await planner.get('/api/items')).body as { id: number; code: string }[];
    const wheatId = itemsList.find((i) => i.code === 'wheat')!.id;
    const nitrogenId = itemsList.find((i) => i.code === 'nitrogen')!.id;
    const byLabel = new Map(seasons.map((s) => [s.label, s.id]));
    const quotes: Record<string, number> = { '2021/22': 250, '2022/23': 300, '2023/24': 240, '2024/25': 215, '2025/26': 222, '2026/27': 231.5 };
    for (const [season, quote] of Object.entries(quotes)) {
      const r = await planner
        .post('/api/futures-quotes')
        .send({ itemId: wheatId, seasonId: byLabel.get(season), contract: 'Sep milling wheat', quote, currency: 'EUR', quotedOn: `${Number(season.slice(0, 4)) + (season === '2026/27' ? 0 : 1)}-06-15`, source: 'Exchange settlement (demo)' });
      expect(r.status).toBe(201);
    }
    expect((await member.get('/api/futures-quotes')).status).toBe(403);
    const extra = await planner.post('/api/futures-quotes').send({ itemId: nitrogenId, seasonId: next.id, contract: 'Urea swap', quote: 1.2, currency: 'EUR', quotedOn: '2026-11-02', source: 'Broker' });
    expect(extra.status).toBe(201);
    const moved = await planner.put(`/api/futures-quotes/${extra.body.id}`).send({ itemId: nitrogenId, seasonId: next.id, contract: 'Urea swap', quote: 1.25, currency: 'EUR', quotedOn: '2026-11-03', source: 'Broker' });
    expect(moved.body).toMatchObject({ quote: 1.25, quotedOn: '2026-11-03', itemCode: 'nitrogen', season: '2026/27' });
    expect((await planner.delete(`/api/futures-quotes/${extra.body.id}`)).status).toBe(204);
    expect((await planner.get(`/api/futures-quotes?itemId=${wheatId}`)).body).toHaveLength(6);
    const bad = await planner.post('/api/futures-quotes').send({ itemId: wheatId, seasonId: next.id, contract: '', quote: -1, currency: 'eur', quotedOn: '15/06/2026', source: 'x' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['body.contract', 'body.currency', 'body.quote', 'body.quotedOn']);

    const put = await planner.put(`/api/outlooks/${outlookId}/expectations`).send({
      items: [
        { item: 'wheat', method: { kind: 'futures-basis', basisSeasons: 5 }, band: { kind: 'percent', pct: 12 }, note: 'New-crop quote of the day' },
        { item: 'canola', method: { kind: 'adaptive', lambda: 0.5 } },
        { item: 'nitrogen', method: { kind: 'moving-average', k: 3 } },
        { item: 'phosphate', method: { kind: 'trend', seasons: 10 } },
        { item: 'potash', method: { kind: 'last' }, band: { kind: 'errors', k: 1.5 } },
        { item: 'diesel', method: { kind: 'manual', value: 1.1 }, band: { kind: 'percent', pct: 10 } },
        { item: 'labour', method: { kind: 'last' } },
      ],
    });
    expect(put.status).toBe(200);
    const ex = Object.fromEntries(put.body.expectations.map((e: { item: string }) => [e.item, e]));

    // Check values from the price list itself: the co-op mean cash price of each season.
    const prices = (await planner.get(`/api/prices?items=${wheatId},${nitrogenId}`)).body as { itemCode: string; season: string; price: number }[];
    const cash = (code: string, season: string) => mean(prices.filter((p) => p.itemCode === code && p.season === season).map((p) => p.price));
    const basis = ['2021/22', '2022/23', '2023/24', '2024/25', '2025/26'].map((s) => cash('wheat', s) - quotes[s]!);
    expect(ex.wheat.base).toBeCloseTo(231.5 + mean(basis), 9);
    expect(ex.wheat.low).toBeCloseTo(ex.wheat.base * 0.88, 9);
    expect(ex.wheat.high).toBeCloseTo(ex.wheat.base * 1.12, 9);
    expect(ex.wheat.explanation).toContain('Sep milling wheat');
    expect(ex.wheat.note).toBe('New-crop quote of the day');
    expect(ex.nitrogen.base).toBeCloseTo(mean(['2023/24', '2024/25', '2025/26'].map((s) => cash('nitrogen', s))), 9);
    // Error band: base × (1 ∓ k·RMS of the method's past relative errors).
    expect(ex.potash.low).toBeCloseTo(ex.potash.base * (1 - (1.5 * ex.potash.errors.rmsPct) / 100), 9);
    expect(ex.potash.errors.seasons).toHaveLength(10);
    expect(ex.diesel).toMatchObject({ base: 1.1, methodLabel: 'Manual figure' });
    expect(ex.diesel.low).toBeCloseTo(0.99, 12);

    const methods = await planner.get(`/api/outlooks/${outlookId}/expectation-methods?item=wheat`);
    expect(methods.status).toBe(200);
    expect(methods.body.methods.find((m: { method: { kind: string } }) => m.method.kind === 'futures-basis').value).toBeCloseTo(ex.wheat.base, 9);
    expect(methods.body.history).toHaveLength(20);
  });

  it('bad settings answer 400 or 422 naming the item and field; nothing is stored', async () => {
    const before = (await planner.get(`/api/outlooks/${outlookId}`)).body.expectations;
    const unknown = await planner.put(`/api/outlooks/${outlookId}/expectations`).send({ items: [{ item: 'barley', method: { kind: 'last' } }] });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details).toEqual([{ path: 'body.items.0.item', message: 'No item has the code "barley"' }]);
    const shape = await planner.put(`/api/outlooks/${outlookId}/expectations`).send({ items: [{ item: 'wheat', method: { kind: 'adaptive', lambda: 1.5 } }] });
    expect(shape.status).toBe(400);
    expect(shape.body.error.details[0].path).toBe('body.items.0.method.lambda');
    const noHistory = await planner
      .put(`/api/outlooks/${outlookId}/expectations`)
      .send({ items: [{ item: 'wheat', method: { kind: 'last' } }, { item: 'diesel', method: { kind: 'manual', value: 1.2 }, band: { kind: 'errors', k: 1 } }] });
    expect(noHistory.status).toBe(422);
    expect(noHistory.body.error.details).toEqual([{ path: 'body.items.1.band', message: 'Diesel: A manual figure has no history of errors; choose a percent band or set low and high' }]);
    expect((await planner.get(`/api/outlooks/${outlookId}`)).body.expectations).toEqual(before);
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    expect((await treasurer.put(`/api/outlooks/${outlookId}/expectations`).send({ items: [{ item: 'wheat', method: { kind: 'last' } }] })).status).toBe(403);
    expect((await treasurer.get(`/api/outlooks/${outlookId}`)).status).toBe(200);
  });
});

describe('season projection', () => {
  let result: {
    farms: { code: string; farmId: number; fixed: Record<string, number>; fixedSource: string; items: { item: string; scenarios: Record<string, { point: number; p5: number; median: number; p95: number }> }[] }[];
    coop: {
      items: { item: string; unit: string; scenarios: Record<string, { point: number; p5: number; median: number; p95: number }>; tonnes: { unit: string; scenarios: Record<string, { point: number }> } | null }[];
      deliveries: { items: string[]; scenarios: Record<string, { point: number; p5: number; p95: number }> };
      capacity: { storageCapacityT: number; scenarios: Record<string, { storageShare: { point: number }; handlingDays: { point: number } }> };
      history: { seasons: string[]; items: Record<string, (number | null)[]> };
    };
    scenarios: { name: string; prices: Record<string, number> }[];
    band?: { words: string };
    trendSeason: number;
    draws: number;
  };

  it('projects every farm at its latest land and the co-op total in the worker pool, matching the engine at the same point', async () => {
    result = await project(outlookId);
    expect(result.farms).toHaveLength(20);
    expect(result.draws).toBe(2000);
    expect(result.trendSeason).toBe(2026);
    const base = result.scenarios.find((s) => s.name === 'base')!.prices;
    const ex = (await planner.get(`/api/outlooks/${outlookId}`)).body.expectations as { item: string; base: number; low: number; high: number }[];
    for (const e of ex) expect(base[e.item]).toBeCloseTo(e.base, 9);
    const low = result.scenarios.find((s) => s.name === 'low')!.prices;
    expect(low.wheat).toBeCloseTo(ex.find((e) => e.item === 'wheat')!.low, 9); // output at its low price
    expect(low.nitrogen).toBeCloseTo(ex.find((e) => e.item === 'nitrogen')!.high, 9); // input at its high price (margin rule)

    // F01 at its 2025/26 land and the 2026/27 trend (2026 − 2006 + 1 = 21), through the engine's own
    // projection of the run's forecasting model (per hectare with farm and season effects, the default with land).
    const f01 = result.farms.find((f) => f.code === 'F01')!;
    const land = (await planner.get(`/api/records/land?farms=${f01.farmId}`)).body as { season: string; landHa: number }[];
    expect(f01.fixed).toEqual({ land_ha: land.find((l) => l.season === '2025/26')!.landHa, trend: 21 });
    // Shown as it is on the farm panel and the member portal: plain words, no stored factor name.
    expect(f01.fixedSource).toBe('land recorded for 2025/26');
    const stored = (await planner.get(`/api/model-runs/${runId}`)).body.result;
    expect(stored.forecast.spec).toBe('per-hectare');
    const direct = projectForecast(stored.forecast, { farms: [{ farm: 'F01', fixed: { land_ha: f01.fixed.land_ha! } }], prices: base, season: 2026, draws: 200, seed: 1 });
    for (const it of f01.items) expect(it.scenarios.base!.point).toBeCloseTo(direct.farms[0]!.quantities[it.item]!.point, 6);
    expect(result.band?.words).toContain('9 in 10');

    for (const item of result.coop.items) {
      const sum = result.farms.reduce((a, f) => a + f.items.find((x) => x.item === item.item)!.scenarios.base!.point, 0);
      expect(item.scenarios.base!.point).toBeCloseTo(sum, 6);
      for (const s of Object.values(item.scenarios)) {
        expect(s.p5).toBeLessThanOrEqual(s.median);
        expect(s.median).toBeLessThanOrEqual(s.p95);
      }
    }
  });

  it('states deliveries in tonnes against the storage and handling capacity of the settings', async () => {
    const settings = (await planner.get('/api/settings')).body;
    expect(settings).toMatchObject({ storageCapacityT: 60000, handlingCapacityTPerDay: 2500 });
    const wheat = result.coop.items.find((i) => i.item === 'wheat')!;
    const canola = result.coop.items.find((i) => i.item === 'canola')!;
    const nitrogen = result.coop.items.find((i) => i.item === 'nitrogen')!;
    expect(result.coop.deliveries.items).toEqual(['wheat', 'canola']);
    const d = result.coop.deliveries.scenarios.base!;
    expect(d.point).toBeCloseTo(wheat.scenarios.base!.point + canola.scenarios.base!.point, 6);
    expect(d.p95).toBeCloseTo(wheat.scenarios.base!.p95 + canola.scenarios.base!.p95, 6);
    const cap = result.coop.capacity.scenarios.base!;
    expect(cap.storageShare.point).toBeCloseTo(d.point / 60000, 12);
    expect(cap.handlingDays.point).toBeCloseTo(d.point / 2500, 12);
    // kg N → t N (1 t = 1000 kg).
    expect(nitrogen.tonnes!.unit).toBe('t N');
    expect(nitrogen.tonnes!.scenarios.base!.point).toBeCloseTo(nitrogen.scenarios.base!.point / 1000, 9);
    expect(result.coop.items.find((i) => i.item === 'diesel')!.tonnes).toBeNull();
    // History for the fan chart: the co-op's recorded totals, 2006/07–2025/26.
    expect(result.coop.history.seasons).toHaveLength(20);
    const recs = (await planner.get('/api/records')).body as { season: string; itemCode: string; quantity: number }[];
    const wheat2025 = recs.filter((r) => r.season === '2025/26' && r.itemCode === 'wheat').reduce((a, r) => a + r.quantity, 0);
    expect(result.coop.history.items.wheat!.at(-1)).toBeCloseTo(wheat2025, 6);
  });
});

describe('publishing, e-mail and the member portal', () => {
  let versionId: number;

  it('nothing unpublished reaches a member', async () => {
    // Nothing published yet is an empty state, not an error: 204 No Content.
    const r = await member.get('/api/portal/outlook');
    expect(r.status).toBe(204);
    expect(r.text).toBe('');
    expect((await member.get(`/api/outlooks/${outlookId}`)).status).toBe(403);
    expect((await member.get(`/api/outlooks/${outlookId}/projection`)).status).toBe(403);
  });

  it('publishing makes version 1 and one personal e-mail per subscribed member (an opted-out member gets none)', async () => {
    const opt = await member.put('/api/account/mail-preferences').send({ outlookEmails: false });
    expect(opt.status).toBe(200);
    expect(opt.body).toEqual({ email: 'member@example.org', outlookEmails: false });
    const pub = await planner.post(`/api/outlooks/${outlookId}/publish`).send({ commentary: 'Wheat area looks steady; watch nitrogen prices.' });
    expect(pub.status).toBe(201);
    expect(pub.body).toMatchObject({ version: 1, season: '2026/27', mails: { queued: 19, skipped: 1 } });
    versionId = pub.body.id;

    const got = await t.smtp.waitFor(19, 30_000);
    await sleep(500); // nothing more should arrive
    const all = t.smtp.messages();
    expect(all).toHaveLength(19);
    const to = all.flatMap((m) => m.to).sort();
    expect(to).toEqual(memberEmails.filter((e) => e !== 'member@example.org').sort());
    // A personal message: the member's own farm, nobody else's.
    const jonah = got.find((m) => m.to[0] === demo.farms[1]!.ownerEmail)!;
    expect(jonah.subject).toBe('Larkfield Grain & Supply Co-operative: season outlook 2026/27');
    expect(jonah.text).toContain(`Your farm, ${demo.farms[1]!.name} (F02`);
    expect(jonah.html).toContain(`Your farm: ${demo.farms[1]!.name} (F02)`);
    for (const other of demo.farms.filter((f) => f.code !== 'F02')) expect(jonah.text).not.toContain(other.name);
    expect(jonah.text).toContain('not financial advice');
    expect(jonah.text).toContain('certified adviser');
    expect(jonah.text).toContain('Wheat area looks steady');
    expect(jonah.text).toContain('http://netput.test/my-farm/outlook');
    expect(jonah.text).toMatch(/http:\/\/netput\.test\/api\/unsubscribe\/\d+\.[A-Za-z0-9_-]{43}/);
    // Issue 16: the date as the app writes it, plain words for the band and the scenarios, one column on a phone.
    const day = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(new Date());
    expect(jonah.text).toContain(`(${day})`);
    expect(jonah.text).not.toMatch(/\(\d{4}-\d{2}-\d{2}\)/);
    for (const jargon of ['5–95', 'λ', '∓', 'Adaptive expectation', "Last season's price"]) expect(jonah.text + jonah.html).not.toContain(jargon);
    expect(jonah.text).toContain('The band is where 9 in 10 outcomes should fall.');
    expect(jonah.html).toContain('<meta name="viewport" content="width=device-width, initial-scale=1">');
    expect(jonah.html).not.toMatch(/width:\s*(9\d\d|[1-9]\d{3})px/);

    const log = await until('the outbox to drain', async () => {
      const l = (await planner.get(`/api/outlooks/${outlookId}/deliveries`)).body;
      return l.counts.queued + l.counts.sending === 0 ? l : undefined;
    }, 60_000);
    expect(log.counts).toEqual({ queued: 0, sending: 0, sent: 19, failed: 0, skipped: 1 });
    const skipped = log.rows.find((r: { status: string }) => r.status === 'skipped');
    expect(skipped).toMatchObject({ to: 'member@example.org', attempts: 0, lastError: 'The member has opted out of outlook e-mails' });
    for (const r of log.rows.filter((x: { status: string }) => x.status === 'sent')) {
      expect(r.attempts).toBe(1);
      expect(r.sentAt).not.toBeNull();
      expect(r.messageId).toBe(`<outlook.v${versionId}.u${r.userId}@netput.example.org>`);
    }
    expect((await member.get(`/api/outlooks/${outlookId}/deliveries`)).status).toBe(403);
    expect((await (await signedIn(t.app, 'treasurer@example.org')).get(`/api/outlooks/${outlookId}/deliveries`)).status).toBe(403);
    expect((await (await signedIn(t.app, 'admin@example.org')).get(`/api/outlooks/${outlookId}/deliveries`)).status).toBe(200);
  });

  it('a published version is never changed: the database refuses, and editing the draft leaves it as it was', async () => {
    const db = t.database.db;
    await expect(db.update(outlookVersions).set({ snapshot: {} }).where(eq(outlookVersions.id, versionId))).rejects.toThrow();
    await expect(db.delete(outlookVersions).where(eq(outlookVersions.id, versionId))).rejects.toThrow();
    await expect(db.update(outlookVersionFarms).set({ data: {} }).where(eq(outlookVersionFarms.versionId, versionId))).rejects.toThrow();
    const before = (await planner.get(`/api/outlooks/versions/${versionId}`)).body;
    expect(before.farms).toHaveLength(20);
    expect(before.commentary).toBe('Wheat area looks steady; watch nitrogen prices.');
    expect((await planner.patch(`/api/outlooks/${outlookId}`).send({ title: 'A new title', commentary: 'Changed later' })).status).toBe(200);
    const after = (await planner.get(`/api/outlooks/versions/${versionId}`)).body;
    expect(after).toEqual(before);
    expect(after.title).toBe('Season outlook 2026/27');
    // Changing what the numbers rest on needs a new projection before the next version.
    await planner.patch(`/api/outlooks/${outlookId}`).send({ scenarioRule: 'uniform' });
    const stale = await planner.post(`/api/outlooks/${outlookId}/publish`).send({});
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toMatch(/project it again/);
    await planner.patch(`/api/outlooks/${outlookId}`).send({ scenarioRule: 'margin' });
    expect((await planner.get(`/api/outlooks/${outlookId}`)).body.projection.upToDate).toBe(true);
    // The published run's model cannot be deleted from under the record.
    const run = (await planner.get(`/api/model-runs/${runId}`)).body;
    expect((await planner.delete(`/api/models/${run.modelId}`)).status).toBe(409);
  });

  it('the member reads the published outlook with their own farm only, whatever ids they try', async () => {
    const r = await member.get('/api/portal/outlook');
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ id: versionId, version: 1, season: { label: '2026/27' } });
    expect(r.body.farm.code).toBe('F01');
    expect(r.body.farms).toBeUndefined();
    expect(r.body.cautions.join(' ')).toContain('certified adviser');
    const json = JSON.stringify(r.body);
    for (const other of demo.farms.filter((f) => f.code !== 'F01')) {
      expect(json).not.toContain(`"${other.code}"`);
      expect(json).not.toContain(other.name);
    }
    // Issue 16: the plain reading — season labels, per hectare beside the totals, one item order, the fertiliser bill.
    const plain = r.body.plain;
    expect(plain.sampleSeasons).toEqual({ first: '2006/07', last: '2024/25' });
    expect(plain.source).toMatch(/records of 2006\/07 to 2024\/25 \(\d[\d,]* farm seasons\).*; .+ published them on \d{1,2} [A-Z][a-z]{2} \d{4}\.$/);
    expect(plain.itemOrder).toEqual(['wheat', 'canola', 'nitrogen', 'phosphate', 'potash', 'diesel', 'labour']);
    const land = r.body.farm.fixed.land_ha as number;
    expect(plain.farmLandHa).toBe(land);
    const wheat = r.body.farm.items.find((i: { item: string }) => i.item === 'wheat');
    expect(plain.farmPerHa.wheat).toBeCloseTo(wheat.scenarios.base.point / land, 10);
    const lines = plain.fertiliser.lines as { item: string; kg: number; kgPerHa: number; pricePerKg: number; cost: number }[];
    expect(lines.map((l) => l.item)).toEqual(['nitrogen', 'phosphate', 'potash']);
    for (const l of lines) {
      const it = r.body.farm.items.find((i: { item: string }) => i.item === l.item);
      const price = r.body.expectations.find((e: { item: string }) => e.item === l.item);
      expect(l.kg).toBe(it.scenarios.base.point);
      expect(l.pricePerKg).toBe(price.base);
      expect(l.cost).toBeCloseTo(l.kg * price.base, 8);
      expect(l.kgPerHa).toBeCloseTo(l.kg / land, 10);
    }
    expect(plain.fertiliser.total).toBeCloseTo(lines.reduce((t, l) => t + l.cost, 0), 8);
    expect(plain.fertiliser.caution).toMatch(/soil tests.*certified adviser/);
    const byId = await member.get(`/api/portal/outlook/versions/${versionId}?farmId=2&farm=F02`);
    expect(byId.body.farm.code).toBe('F01');
    expect((await member.get('/api/portal/outlook/versions/999999')).status).toBe(404);
    expect((await member.get(`/api/outlooks/versions/${versionId}`)).status).toBe(403);
    expect((await member.get('/api/outlooks/versions')).status).toBe(403);
    expect((await member.get('/api/outlooks/accountability')).status).toBe(403);
    expect((await planner.get('/api/portal/outlook')).status).toBe(403);
    const versions = await member.get('/api/portal/outlook/versions');
    expect(versions.body).toEqual([expect.objectContaining({ id: versionId, version: 1, season: '2026/27' })]);
  });

  it('a new draft is published as version 2 and mailed again to every subscribed member', async () => {
    expect((await member.put('/api/account/mail-preferences').send({ outlookEmails: true })).body.outlookEmails).toBe(true);
    t.smtp.clear();
    const pub = await planner.post(`/api/outlooks/${outlookId}/publish`).send({ commentary: 'Second look after the autumn rains.' });
    expect(pub.status).toBe(201);
    expect(pub.body).toMatchObject({ version: 2, mails: { queued: 20, skipped: 0 } });
    await t.smtp.waitFor(20, 30_000);
    await sleep(300);
    expect(t.smtp.messages().map((m) => m.to[0]).sort()).toEqual([...memberEmails].sort());
    expect(t.smtp.messages()[0]!.subject).toContain('(update 2)');
    const latest = (await member.get('/api/portal/outlook')).body;
    expect(latest).toMatchObject({ version: 2, title: 'A new title', commentary: 'Second look after the autumn rains.' });
    expect((await member.get(`/api/portal/outlook/versions/${versionId}`)).body.version).toBe(1);
    // The key is unique per member and version: queueing the same message again adds nothing.
    const [{ n }] = await t.database.db.select({ n: sql<number>`count(*)`.mapWith(Number) }).from(mailOutbox);
    expect(n).toBe(40);
  });

  it('opening the unsubscribe link only asks; its button turns outlook e-mails off without signing in; a forged link does not', async () => {
    const email = demo.farms[2]!.ownerEmail;
    const mail = t.smtp.messages().find((m) => m.to[0] === email)!;
    const link = /http:\/\/netput\.test(\/api\/unsubscribe\/\S+)/.exec(mail.text)![1]!;
    const optOut = async () => (await t.database.db.select({ optOut: users.mailOptOut }).from(users).where(eq(users.email, email)))[0]!.optOut;
    const anon = supertest(t.app);
    // A mail filter that follows the link (GET) unsubscribes nobody: the page asks first.
    const page = await anon.get(link).set('Accept', 'text/html');
    expect(page.status).toBe(200);
    expect(page.type).toBe('text/html');
    expect(page.text).toContain('Stop the outlook e-mails?');
    expect(page.text).toContain(`<form method="post" action="${link}">`);
    expect(await optOut()).toBe(false);
    // The page's button: a plain form POST from the browser, no XSRF header.
    const confirmed = await anon.post(link).set('Accept', 'text/html').set('Origin', 'http://netput.test').type('form').send('');
    expect(confirmed.status).toBe(200);
    expect(confirmed.text).toContain('You will get no more outlook e-mails');
    expect(await optOut()).toBe(true);
    expect((await anon.get(link).set('Accept', 'text/html')).text).toContain('Outlook e-mails are already off');
    const forged = link.replace(/\.(.)/, (_m, c: string) => `.${c === 'A' ? 'B' : 'A'}`);
    expect((await anon.get(forged).set('Accept', 'application/json')).status).toBe(404);
    expect((await anon.post(forged).type('form').send('List-Unsubscribe=One-Click')).status).toBe(404);
    expect((await anon.get('/api/unsubscribe/1.short')).status).toBe(404);
    expect(await optOut()).toBe(true);
  });

  it('the RFC 8058 one-click POST of a mail program unsubscribes at once, without cookies', async () => {
    const email = demo.farms[3]!.ownerEmail;
    const mail = t.smtp.messages().find((m) => m.to[0] === email)!;
    const link = /http:\/\/netput\.test(\/api\/unsubscribe\/\S+)/.exec(mail.text)![1]!;
    // The message names the same address for the one-click POST.
    const [queued] = await t.database.db.select({ headers: mailOutbox.headers }).from(mailOutbox).where(eq(mailOutbox.toAddress, email)).limit(1);
    expect(queued!.headers).toMatchObject({ 'List-Unsubscribe': `<http://netput.test${link}>`, 'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click' });
    const one = await supertest(t.app).post(link).type('form').send('List-Unsubscribe=One-Click');
    expect(one.status).toBe(200);
    expect(one.body).toEqual({ email, outlookEmails: false });
  });
});

describe('accountability', () => {
  it('sets a published 2025/26 outlook against the 2025/26 farm records and prices, per item and per farm', async () => {
    const created = await planner.post('/api/outlooks').send({ season: '2025/26', modelRunId: runId, title: 'Outlook 2025/26 (entered afterwards)' });
    expect(created.status).toBe(201);
    const id = created.body.id;
    const result = await project(id);
    const pub = await planner.post(`/api/outlooks/${id}/publish`).send({ notifyMembers: false });
    expect(pub.body.mails).toEqual({ queued: 0, skipped: 0 });

    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const acc = await treasurer.get('/api/outlooks/accountability');
    expect(acc.status).toBe(200);
    const s2025 = acc.body.seasons.find((s: { season: string }) => s.season === '2025/26');
    const s2026 = acc.body.seasons.find((s: { season: string }) => s.season === '2026/27');
    expect(s2026).toMatchObject({ status: 'awaiting records', version: 2 });
    expect(s2025).toMatchObject({ status: 'complete', version: 1, modelRunId: runId });

    const recs = (await planner.get('/api/records')).body as { farmCode: string; season: string; itemCode: string; quantity: number }[];
    const actual = (code: string, farm?: string) => recs.filter((r) => r.season === '2025/26' && r.itemCode === code && (!farm || r.farmCode === farm)).reduce((a, r) => a + r.quantity, 0);
    const wheat = s2025.items.find((i: { item: string }) => i.item === 'wheat');
    const projected = result.coop.items.find((i: { item: string }) => i.item === 'wheat').scenarios.base;
    expect(wheat.projected).toBeCloseTo(projected.point, 9);
    expect(wheat.actual).toBeCloseTo(actual('wheat'), 6);
    expect(wheat.errorPct).toBeCloseTo((100 * (projected.point - actual('wheat'))) / actual('wheat'), 6);
    expect(wheat.withinBand).toBe(actual('wheat') >= projected.p5 && actual('wheat') <= projected.p95);
    expect(wheat).toMatchObject({ farmsReported: 20, farmsProjected: 20 });
    const f05 = s2025.farms.find((f: { code: string }) => f.code === 'F05').items.find((i: { item: string }) => i.item === 'nitrogen');
    expect(f05.actual).toBe(actual('nitrogen', 'F05'));
    expect(f05.error).toBeCloseTo(f05.projected - actual('nitrogen', 'F05'), 9);
    // Prices: the default "last season" expectation (2024/25 mean) against the 2025/26 mean.
    const prices = (await planner.get('/api/prices')).body as { itemCode: string; season: string; price: number }[];
    const m = (season: string) => mean(prices.filter((p) => p.itemCode === 'canola' && p.season === season).map((p) => p.price));
    const canola = s2025.prices.find((p: { item: string }) => p.item === 'canola');
    expect(canola.expected.base).toBeCloseTo(m('2024/25'), 9);
    expect(canola.actual).toBeCloseTo(m('2025/26'), 9);
    expect(canola.errorPct).toBeCloseTo((100 * (m('2024/25') - m('2025/26'))) / m('2025/26'), 9);
    const summary = acc.body.summary.items.find((i: { item: string }) => i.item === 'wheat');
    expect(summary.seasons).toBe(1);
    expect(summary.mape).toBeCloseTo(Math.abs(wheat.errorPct), 9);
    expect(acc.body.summary.farms).toHaveLength(20);
    // The portal's latest outlook is the newest season's, not the one published last.
    expect((await member.get('/api/portal/outlook')).body).toMatchObject({ season: { label: '2026/27' }, version: 2 });
    expect((await member.get('/api/outlooks/accountability')).status).toBe(403);
  });
});

describe('a full reset of the database', () => {
  it('removes outlooks and their versions only when the reset says so', async () => {
    const { purgeOutlookData } = await import('../../server/outlook/outlook-repository.js');
    await expect(t.database.db.delete(outlookVersionFarms)).rejects.toThrow();
    await t.database.db.transaction(async (tx) => purgeOutlookData(tx));
    const [{ n }] = await t.database.db.select({ n: sql<number>`count(*)`.mapWith(Number) }).from(outlookVersions);
    expect(n).toBe(0);
    expect((await planner.get('/api/outlooks')).body).toEqual([]);
  });
});
