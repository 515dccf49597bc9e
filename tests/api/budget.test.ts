import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { seedFertiliserProducts } from '../../server/budget/fertiliser-products-repository.js';
import { recomputeStoredBudget } from '../../server/budget/budget-service.js';
import { KG_PER_LB, KG_PER_SHORT_TON } from '../../shared/units.js';
import { demoModel } from '../../seed/demo-model.js';

let t: TestApp;
let runId: number;
type Agent = Awaited<ReturnType<typeof signedIn>>;
let treasurer: Agent;
let planner: Agent;
let member: Agent;
let products: { id: number; name: string; nPct: number; p2o5Pct: number; k2oPct: number; pricePerT: number; lotT: number }[];

const definition = demoModel({ backtestSeasons: 0 });

const bookingPlan = {
  months: [
    { month: '2026-08', share: 0.4, prepay: true },
    { month: '2026-10', share: 0.4, prepay: true },
    { month: '2027-01', share: 0.2, prepay: false },
  ],
  prepayDiscountPct: 2.5,
  paymentTermsDays: 30,
  deliveryMonth: '2027-02',
  financingRatePct: 5,
};

beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  await seedFertiliserProducts(t.database.db);
  planner = await signedIn(t.app, 'planner@example.org');
  treasurer = await signedIn(t.app, 'treasurer@example.org');
  member = await signedIn(t.app, 'member@example.org');
  const model = await planner.post('/api/models').send({ name: 'Budget test model', definition });
  const run = await planner.post(`/api/models/${model.body.id}/runs`);
  runId = run.body.id;
  for (let i = 0; i < 1200; i++) {
    const s = (await planner.get(`/api/model-runs/${runId}/status`)).body;
    if (s.status === 'succeeded') break;
    if (['failed', 'cancelled'].includes(s.status)) throw new Error(`the fit ${s.status}: ${s.error}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  products = (await treasurer.get('/api/fertiliser-products')).body;
}, 120_000);
afterAll(async () => t.close());

const id = (name: string) => products.find((p) => p.name === name)!.id;

describe('fertiliser products', () => {
  it('the demo list carries the published grades', () => {
    const grade = (name: string) => {
      const p = products.find((x) => x.name === name)!;
      return [p.nPct, p.p2o5Pct, p.k2oPct];
    };
    // Cornell NRCCA CA4 PO26: anhydrous ammonia 82-0-0, urea 46-0-0, UAN 28-0-0 to 32-0-0.
    expect(grade('Anhydrous ammonia')).toEqual([82, 0, 0]);
    expect(grade('Urea')).toEqual([46, 0, 0]);
    expect(grade('UAN 28 %')).toEqual([28, 0, 0]);
    expect(grade('UAN 32 %')).toEqual([32, 0, 0]);
    // UNL PASSEL: MAP 11-52-0, DAP 18-46-0.
    expect(grade('MAP')).toEqual([11, 52, 0]);
    expect(grade('DAP')).toEqual([18, 46, 0]);
    // Virginia Tech SPES-201: muriate of potash 60 % K2O.
    expect(grade('Muriate of potash')).toEqual([0, 0, 60]);
    expect(products.every((p) => (p as unknown as { priceNote: string }).priceNote.startsWith('Invented'))).toBe(true);
  });

  it('a treasurer adds a product; a grade over 100 % answers 400 naming the field; a planner may not write', async () => {
    const body = { name: 'Ammonium sulfate', nPct: 21, form: 'solid', pricePerT: 290, currency: 'EUR', lotT: 25, supplier: 'Demo', gradeSource: 'Cornell NRCCA CA4 PO26: 21-0-0-24S' };
    const created = await treasurer.post('/api/fertiliser-products').send({ ...body, active: false });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ name: 'Ammonium sulfate', nPct: 21, p2o5Pct: 0, k2oPct: 0, active: false });
    const bad = await treasurer.post('/api/fertiliser-products').send({ ...body, name: 'Too rich', nPct: 60, p2o5Pct: 50 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual([{ path: 'body.nPct', message: 'N + P2O5 + K2O add up to 110 %, more than 100 %' }]);
    expect((await planner.post('/api/fertiliser-products').send(body)).status).toBe(403);
    expect((await member.get('/api/fertiliser-products')).status).toBe(403);
  });
});

describe('budgets', () => {
  it('a treasurer builds a budget from the demo model run, adds nitrogen price scenarios and exports it', async () => {
    const res = await treasurer.post('/api/budgets?units=metric').send({
      name: 'Season 2026/27 fertiliser',
      source: { kind: 'model-run', runId },
      bookingPlan,
      scenarios: [
        { name: 'N +20 %', priceChanges: { nitrogen: 20 } },
        { name: 'N −20 %', priceChanges: { nitrogen: -20 } },
      ],
    });
    expect(res.status).toBe(201);
    const b = res.body;
    const r = b.result;
    expect(r.scenarios.map((s: { name: string }) => s.name)).toEqual(['Base', 'N +20 %', 'N −20 %']);
    expect(r.cautions[0]).toMatch(/not an application recommendation/);
    expect(r.cautions[1]).toBe('Application rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.');
    // Plain words for treasurers: no national credential, no library name, no bare formula.
    expect([...r.cautions, ...r.notes].join(' ')).not.toMatch(/Certified Crop Adviser|state-certified|javascript-lp-solver|x_i|e_ij/);
    expect(r.notes[0]).toMatch(/^Product mix: the cheapest mix of the co-op’s products that meets every nutrient need, found by linear programming\./);
    // The prices the model used, with the items' names and units to show them by (seed/technology.ts).
    expect(r.source.detail.priceItems.nitrogen).toEqual({ name: 'Nitrogen (N)', unit: 'kg N' });
    expect(r.source.detail.priceItems.wheat).toEqual({ name: 'Wheat', unit: 't' });
    expect(Object.keys(r.source.detail.priceItems).sort()).toEqual(Object.keys(r.source.detail.prices).sort());
    expect(r.source.detail.season).toBe(2026);
    expect(r.source.detail.farms).toHaveLength(20);

    // One farm's demand is the engine's own evaluation at that farm's land and the next season's trend.
    const f0 = r.source.detail.farms[0];
    const priceArg = Object.entries(r.source.detail.prices as Record<string, number>).map(([k, v]) => `${k}=${v}`).join(',');
    const ev = await treasurer.get(`/api/model-runs/${runId}/evaluate?prices=${priceArg}&fixed=land_ha=${f0.fixed.land_ha},trend=${f0.fixed.trend}`);
    const nIdx = ev.body.items.findIndex((x: { name: string }) => x.name === 'nitrogen');
    expect(f0.demand.nitrogen).toBeCloseTo(-ev.body.netputs[nIdx], 6);

    // The base plan, checked by hand against the LP: with the demo prices urea is the cheapest N
    // (475/460 = 1.033 per kg N), DAP the cheapest P2O5 net of its N credit, and muriate of potash
    // the only K2O. DAP tonnes = P2O5/460 kg, MOP = K2O/600, urea = (N − 180·DAP)/460.
    const base = r.scenarios[0];
    const d = base.demand;
    const line = (s: typeof base, name: string) => s.mix.lines.find((l: { name: string }) => l.name === name);
    expect(base.mix.lines.map((l: { name: string }) => l.name).sort()).toEqual(['DAP', 'Muriate of potash', 'Urea']);
    const dapT = d.phosphate / 460;
    expect(line(base, 'DAP').lpTonnes).toBeCloseTo(dapT, 4);
    expect(line(base, 'Muriate of potash').lpTonnes).toBeCloseTo(d.potash / 600, 4);
    expect(line(base, 'Urea').lpTonnes).toBeCloseTo((d.nitrogen - 180 * dapT) / 460, 4);
    for (const l of base.mix.lines) {
      expect(l.tonnes).toBe(l.lots * l.lotT);
      expect(l.tonnes).toBeGreaterThanOrEqual(l.lpTonnes);
      expect(l.tonnes - l.lpTonnes).toBeLessThan(l.lotT);
      expect(l.cost).toBeCloseTo(l.tonnes * l.pricePerT, 6);
    }
    for (const n of ['nitrogen', 'phosphate', 'potash']) expect(base.mix.supply[n]).toBeGreaterThanOrEqual(d[n]);
    // P and K as elements: P2O5 × 0.4364, K2O × 0.8301 (docs/fertiliser.md §2), to the 4-decimal factors.
    expect(base.demandElements.p / d.phosphate).toBeCloseTo(0.4364, 4);
    expect(base.demandElements.k / d.potash).toBeCloseTo(0.8301, 3);

    // Nitrogen +20 %: demand moves by 1.2^e with the co-op elasticities; urea's price by 20 %.
    const up = r.scenarios[1];
    const e = r.demand.elasticities;
    expect(e.nitrogen.nitrogen).toBeLessThan(0);
    expect(up.demand.nitrogen / d.nitrogen).toBeCloseTo(1.2 ** e.nitrogen.nitrogen, 10);
    expect(up.demand.phosphate / d.phosphate).toBeCloseTo(1.2 ** e.phosphate.nitrogen, 10);
    expect(up.demand.nitrogen).toBeLessThan(d.nitrogen);
    expect(up.productPrices.find((p: { name: string }) => p.name === 'Urea').pricePerT).toBeCloseTo(475 * 1.2, 8);
    expect(up.productPrices.find((p: { name: string }) => p.name === 'Muriate of potash').changePct).toBe(0);
    const dapChange = up.productPrices.find((p: { name: string }) => p.name === 'DAP').changePct;
    expect(dapChange).toBeGreaterThan(0);
    expect(dapChange).toBeLessThan(20);
    // The constant-elasticity approximation stays near the model re-evaluated at +20 %.
    expect(Math.abs(up.demand.nitrogen / up.modelDemand.nitrogen - 1)).toBeLessThan(0.03);
    expect(r.scenarios[2].demand.nitrogen).toBeGreaterThan(d.nitrogen);

    // Cash: the months add up to the total paid, which is the lot cost less the prepayment discount.
    for (const s of r.scenarios) {
      const months = s.cash.months;
      expect(months.reduce((a: number, m: { cash: number }) => a + m.cash, 0)).toBeCloseTo(s.totals.cash, 4);
      expect(months.at(-1).cumulative).toBeCloseTo(s.totals.cash, 4);
      expect(s.totals.cash).toBeCloseTo(s.totals.cost * (1 - 0.8 * 0.025), 4);
      expect(months.map((m: { month: string }) => m.month)).toEqual(['2026-08', '2026-09', '2026-10', '2026-11', '2026-12', '2027-01', '2027-02', '2027-03']);
    }

    // Planners and admins read it; members do not.
    const read = await planner.get(`/api/budgets/${b.id}?units=metric`);
    expect(read.status).toBe(200);
    expect(read.body.result).toEqual(r);
    expect((await member.get(`/api/budgets/${b.id}`)).status).toBe(403);
    expect((await member.get('/api/budgets')).status).toBe(403);
    const list = (await planner.get('/api/budgets')).body;
    expect(list.find((x: { id: number }) => x.id === b.id)).toMatchObject({ name: 'Season 2026/27 fertiliser', sourceKind: 'model-run', currency: 'EUR' });

    // US units: lb and short tons with the exact factors (lb = 0.45359237 kg; short ton = 907.18474 kg).
    const us = (await planner.get(`/api/budgets/${b.id}?units=us`)).body.result;
    expect(us.units).toMatchObject({ nutrient: 'lb', product: 'short ton' });
    expect(us.demand.base.nitrogen).toBeCloseTo(d.nitrogen / KG_PER_LB, 6);
    expect(line(us.scenarios[0], 'Urea').tonnes).toBeCloseTo((line(base, 'Urea').tonnes * 1000) / KG_PER_SHORT_TON, 8);
    expect(line(us.scenarios[0], 'Urea').pricePerT).toBeCloseTo((475 * KG_PER_SHORT_TON) / 1000, 8);
    expect(us.scenarios[0].totals.cash).toBe(base.totals.cash);

    // The stored result is reproduced from the stored inputs.
    const { stored, recomputed } = await recomputeStoredBudget(t.database.db, b.id);
    expect(recomputed).toEqual(stored);

    // CSV for the board: heading with the cautions, then a cash-flow table (a row per month) and a
    // purchase table (a row per product), every scenario side by side, money in whole euros.
    const csv = await planner.get(`/api/budgets/${b.id}/export?format=csv&units=metric`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.headers['content-disposition']).toBe(`attachment; filename="budget-${b.id}-season-2026-27-fertiliser.csv"`);
    const cells = Papa.parse<string[]>(csv.text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data;
    expect(cells[0]).toEqual(['Fertiliser budget', 'Season 2026/27 fertiliser']);
    expect(cells.filter((c) => c[0] === 'Caution').map((c) => c[1])).toEqual(r.cautions);
    const at = (title: string) => cells.findIndex((c) => c[0] === title);
    const cashHead = cells[at('Cash flow by month') + 1]!;
    expect(cashHead.slice(0, 4)).toEqual(['Month', 'Base: booked (t)', 'Base: paid in the month (EUR)', 'Base: paid to date (EUR)']);
    const cashRows = cells.slice(at('Cash flow by month') + 2, at('Purchases by product'));
    expect(cashRows.map((c) => c[0])).toEqual([...base.cash.months.map((m: { month: string }) => ({ '2026-08': 'Aug 2026', '2026-09': 'Sep 2026', '2026-10': 'Oct 2026', '2026-11': 'Nov 2026', '2026-12': 'Dec 2026', '2027-01': 'Jan 2027', '2027-02': 'Feb 2027', '2027-03': 'Mar 2027' })[m.month]), 'Total']);
    // Whole euros: every money cell is an integer, and the month's cash is the rounded engine figure.
    expect(cashRows[0]![2]).toBe(String(Math.round(base.cash.months[0].cash)));
    expect(cashRows.at(-1)![2]).toBe(String(Math.round(base.totals.cash)));
    const buyHead = cells[at('Purchases by product') + 1]!;
    expect(buyHead.slice(0, 5)).toEqual(['Product', 'Grade (N-P2O5-K2O)', 'Base: price (EUR/t)', 'Base: bought (t)', 'Base: cost (EUR)']);
    const ureaRow = cells.slice(at('Purchases by product') + 2).find((c) => c[0] === 'Urea')!;
    expect(ureaRow.slice(1, 5)).toEqual(['46-0-0', '475', String(Math.round(line(base, 'Urea').tonnes * 10) / 10), String(Math.round(line(base, 'Urea').cost))]);
    expect(cells[at('Totals by scenario') + 1]![0]).toBe('Scenario');
    expect(cells.slice(at('Totals by scenario') + 2, at('Totals by scenario') + 5).map((c) => c[0])).toEqual(['Base', 'N +20 %', 'N −20 %']);
    // No unrounded figure: whole euros, tonnes to 0.1.
    for (const c of [...cashRows, ...cells.slice(at('Purchases by product') + 2, at('Totals by scenario'))]) for (const v of c.slice(2)) expect(v).toMatch(/^(-?\d+(\.\d)?)?$/);
    expect(cells.length).toBeLessThan(60);

    // XLSX: the sheets, headed by the cautions.
    const xlsx = await planner.get(`/api/budgets/${b.id}/export?format=xlsx`).buffer(true).parse((response, cb) => {
      const chunks: Buffer[] = [];
      response.on('data', (c: Buffer) => chunks.push(c));
      response.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(xlsx.status).toBe(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(xlsx.body as unknown as Parameters<typeof wb.xlsx.load>[0]);
    expect(wb.worksheets.map((w) => w.name)).toEqual(['Summary', 'Scenarios', 'Plan', 'Cash', 'Cautions']);
    for (const ws of wb.worksheets) expect(ws.getCell('A1').value).toBe(r.cautions[0]);
    const plan = wb.getWorksheet('Plan')!;
    const urea: unknown[] = [];
    plan.eachRow((row) => {
      if (row.getCell(1).value === 'Base' && row.getCell(2).value === 'Urea') urea.push(row.getCell(8).value);
    });
    expect(urea).toEqual([line(base, 'Urea').tonnes]);
  });

  it('from a hand-entered demand: DAP and urea in 25 t lots, and the cheaper whole-lot plan', async () => {
    // Hand-computed (see server/budget/product-mix.test.ts): N 100 000, P2O5 46 000, K2O 30 000 kg.
    // Every product in 25 t lots here. Round up: DAP 100 t (4 lots), urea 178.26 → 200 t (8 lots),
    // MOP 50 t (2 lots): 65 000 + 95 000 + 17 750.
    const choice = ['Urea', 'Anhydrous ammonia', 'DAP', 'MAP', 'Muriate of potash'].map((n) => ({ productId: id(n), lotT: 25 }));
    const body = { name: 'Hand case', source: { kind: 'manual', nKg: 100_000, p2o5Kg: 46_000, k2oKg: 30_000 }, products: choice, bookingPlan };
    const up = await treasurer.post('/api/budgets/preview?units=metric').send(body);
    expect(up.status).toBe(200);
    const base = up.body.result.scenarios[0];
    expect(base.mix.lines.map((l: { name: string; lots: number }) => [l.name, l.lots])).toEqual([
      ['Urea', 8],
      ['DAP', 4],
      ['Muriate of potash', 2],
    ]);
    expect(base.totals.cost).toBeCloseTo(65_000 + 95_000 + 17_750, 6);
    expect(base.mix.overSupply.nitrogen).toBeCloseTo(10_000, 6);
    expect(up.body.result.demand.elasticitySource).toBe('none');
    const whole = await treasurer.post('/api/budgets/preview?units=metric').send({ ...body, options: { lotRule: 'whole-lots' } });
    const wb = whole.body.result.scenarios[0];
    // Whole lots: ammonia 4 + DAP 4 + MOP 2 = 87 000 + 65 000 + 17 750 (hand case of product-mix.test.ts).
    expect(wb.mix.lines.filter((l: { lots: number }) => l.lots > 0).map((l: { name: string; lots: number }) => [l.name, l.lots])).toEqual([
      ['Anhydrous ammonia', 4],
      ['DAP', 4],
      ['Muriate of potash', 2],
    ]);
    expect(wb.totals.cost).toBeCloseTo(87_000 + 65_000 + 17_750, 6);
    // A preview stores nothing.
    expect((await treasurer.get('/api/budgets')).body.some((x: { name: string }) => x.name === 'Hand case')).toBe(false);
  });

  it('with manual elasticities, a scenario moves the demand; without, it holds demand and says so', async () => {
    const elasticities = {
      nitrogen: { nitrogen: -0.4, phosphate: -0.05, potash: -0.03 },
      phosphate: { nitrogen: -0.05, phosphate: -0.5, potash: -0.08 },
      potash: { nitrogen: -0.03, phosphate: -0.08, potash: -0.55 },
    };
    const body = { name: 'Elastic', source: { kind: 'manual', nKg: 100_000, p2o5Kg: 40_000, k2oKg: 30_000, elasticities }, bookingPlan, scenarios: [{ name: 'N up', priceChanges: { nitrogen: 20 } }] };
    const r = (await treasurer.post('/api/budgets/preview').send(body)).body.result;
    // 100 000 × 1.2^−0.4 = 92 966.72 (hand value by a calculator).
    expect(r.scenarios[1].demand.nitrogen).toBeCloseTo(92_966.72, 1);
    const { elasticities: _, ...fixed } = body.source;
    const r2 = (await treasurer.post('/api/budgets/preview').send({ ...body, source: fixed })).body.result;
    expect(r2.scenarios[1].demand.nitrogen).toBe(100_000);
    expect(r2.warnings).toContain('The demand source has no elasticities, so the scenarios change prices but hold the nutrient demand fixed');
  });

  it('a treasurer replaces and deletes a budget; each change is audited', async () => {
    const body = { name: 'To change', source: { kind: 'manual', nKg: 50_000, p2o5Kg: 0, k2oKg: 0 }, bookingPlan };
    const created = (await treasurer.post('/api/budgets').send(body)).body;
    const put = await treasurer.put(`/api/budgets/${created.id}`).send({ ...body, name: 'Changed', scenarios: [{ name: 'Cheap N', priceChanges: { nitrogen: -10 } }] });
    expect(put.status).toBe(200);
    expect(put.body.name).toBe('Changed');
    expect(put.body.result.scenarios).toHaveLength(2);
    expect((await planner.put(`/api/budgets/${created.id}`).send(body)).status).toBe(403);
    expect((await treasurer.delete(`/api/budgets/${created.id}`)).status).toBe(204);
    expect((await treasurer.get(`/api/budgets/${created.id}`)).status).toBe(404);
    const admin = await signedIn(t.app, 'admin@example.org');
    const audit = (await admin.get('/api/audit?limit=50')).body.rows.filter((a: { entity: string; entityId: string }) => a.entity === 'budget' && a.entityId === String(created.id));
    expect(audit.map((a: { action: string }) => a.action).sort()).toEqual(['budget.create', 'budget.delete', 'budget.update']);
  });

  it('bad inputs answer with what and where, and nothing is stored', async () => {
    const before = (await treasurer.get('/api/budgets')).body.length;
    const manual = { kind: 'manual', nKg: 1000, p2o5Kg: 0, k2oKg: 0 };
    const shares = await treasurer.post('/api/budgets').send({ name: 'x', source: manual, bookingPlan: { ...bookingPlan, months: [{ month: '2026-08', share: 0.5 }] } });
    expect(shares.status).toBe(422);
    expect(shares.body.error).toMatchObject({ code: 'unprocessable', details: [{ path: 'bookingPlan.months', message: 'The booked shares must add up to 1 (100 %); they add up to 50 %' }] });
    const month = await treasurer.post('/api/budgets').send({ name: 'x', source: manual, bookingPlan: { ...bookingPlan, months: [{ month: '2026-13', share: 1 }] } });
    expect(month.status).toBe(400);
    expect(month.body.error.details).toEqual([{ path: 'body.bookingPlan.months.0.month', message: 'Use YYYY-MM, e.g. 2026-08' }]);
    const product = await treasurer.post('/api/budgets').send({ name: 'x', source: manual, bookingPlan, products: [{ productId: 9999 }] });
    expect(product.status).toBe(422);
    expect(product.body.error.details).toEqual([{ path: 'products.0.productId', message: 'There is no fertiliser product 9999' }]);
    const noK = await treasurer.post('/api/budgets').send({ name: 'x', source: { ...manual, k2oKg: 500 }, bookingPlan, products: [{ productId: id('Urea') }] });
    expect(noK.status).toBe(422);
    expect(noK.body.error.message).toMatch(/No product in the budget supplies K2O/);
    const outlook = await treasurer.post('/api/budgets').send({ name: 'x', source: { kind: 'outlook', outlookVersionId: 999_999 }, bookingPlan });
    expect(outlook.status).toBe(404);
    const noRun = await treasurer.post('/api/budgets').send({ name: 'x', source: { kind: 'model-run', runId: 9999 }, bookingPlan });
    expect(noRun.status).toBe(404);
    const badItem = await treasurer.post('/api/budgets').send({ name: 'x', source: { kind: 'model-run', runId, prices: { urea: 400 } }, bookingPlan });
    expect(badItem.status).toBe(422);
    expect(badItem.body.error.details[0].path).toBe('source.prices.urea');
    const baseName = await treasurer.post('/api/budgets').send({ name: 'x', source: manual, bookingPlan, scenarios: [{ name: 'base' }] });
    expect(baseName.status).toBe(400);
    expect(baseName.body.error.details).toEqual([{ path: 'body.scenarios.0.name', message: '"Base" is the name of the unchanged scenario' }]);
    expect((await planner.post('/api/budgets').send({ name: 'x', source: manual, bookingPlan })).status).toBe(403);
    expect((await treasurer.get('/api/budgets')).body.length).toBe(before);
  });

  it('a treasurer builds a budget from a published outlook: its projected demand, the model\'s elasticities', async () => {
    // The outlook flow of issue 6, through its own API: draft (default expectations: last season's
    // prices), projection job, publication without e-mails.
    const draft = await planner.post('/api/outlooks').send({ season: '2026/27', modelRunId: runId });
    expect(draft.status).toBe(201);
    expect((await planner.patch(`/api/outlooks/${draft.body.id}`).send({ draws: 500 })).status).toBe(200);
    expect((await planner.post(`/api/outlooks/${draft.body.id}/projection`)).status).toBe(202);
    for (let i = 0; i < 600; i++) {
      const p = (await planner.get(`/api/outlooks/${draft.body.id}/projection`)).body;
      if (p.status === 'succeeded') break;
      if (p.status === 'failed') throw new Error(`the projection failed: ${p.error}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const pub = await planner.post(`/api/outlooks/${draft.body.id}/publish`).send({ notifyMembers: false });
    expect(pub.status).toBe(201);
    const version = (await treasurer.get(`/api/outlooks/versions/${pub.body.id}`)).body;
    const published = (code: string) => version.projection.coop.items.find((x: { item: string }) => x.item === code).scenarios.base;

    // The default season calendar: season 2026/27 begins with the 2026 harvest, its inputs are bought Aug 2025 – Mar 2026.
    const seasonPlan = { ...bookingPlan, months: [{ month: '2025-08', share: 0.4, prepay: true }, { month: '2025-10', share: 0.4, prepay: true }, { month: '2026-01', share: 0.2, prepay: false }], deliveryMonth: '2026-02' };
    const res = await treasurer.post('/api/budgets?units=metric').send({
      name: 'From the published outlook',
      source: { kind: 'outlook', outlookVersionId: pub.body.id },
      bookingPlan: seasonPlan,
      scenarios: [{ name: 'N +20 %', priceChanges: { nitrogen: 20 } }],
    });
    expect(res.status).toBe(201);
    const r = res.body.result;
    expect(r.source.kind).toBe('outlook');
    expect(r.source.detail).toMatchObject({ versionId: pub.body.id, version: 1, seasonLabel: '2026/27', scenario: 'base', runId });
    expect(r.source.detail.priceItems.potash).toEqual({ name: 'Potash (K2O)', unit: 'kg K2O' });
    // The published figures, unchanged (demo items are in kg of nutrient).
    expect(r.demand.base.nitrogen).toBe(published('nitrogen').point);
    expect(r.demand.base.phosphate).toBe(published('phosphate').point);
    expect(r.demand.base.potash).toBe(published('potash').point);
    expect(r.source.detail.bands.nitrogen).toEqual({ p5: published('nitrogen').p5, p95: published('nitrogen').p95 });
    // The model re-evaluated at the outlook's own farms agrees with the published point, so no warning.
    expect(r.warnings).toEqual([]);
    expect(r.demand.elasticitySource).toBe('outlook');
    // Low, base and high side by side; the products cost each scenario's nutrient prices.
    expect(r.scenarios.map((s: { name: string }) => s.name)).toEqual(['Base', 'Outlook low', 'Outlook high', 'N +20 %']);
    const nPrice = (name: string) => version.scenarios.find((s: { name: string }) => s.name === name).prices.nitrogen;
    const urea = (row: string) => r.scenarios.find((s: { name: string }) => s.name === row).productPrices.find((p: { name: string }) => p.name === 'Urea').pricePerT;
    expect(urea('Base')).toBeCloseTo(460 * nPrice('base'), 6);
    expect(urea('Outlook low')).toBeCloseTo(460 * nPrice('low'), 6);
    expect(urea('Outlook high')).toBeCloseTo(460 * nPrice('high'), 6);
    expect(r.scenarios[1].demand.nitrogen).toBe(version.projection.coop.items.find((x: { item: string }) => x.item === 'nitrogen').scenarios.low.point);
    expect(r.pricing.basis).toBe('outlook');
    const up = r.scenarios[3];
    expect(up.demand.nitrogen / r.demand.base.nitrogen).toBeCloseTo(1.2 ** r.demand.elasticities.nitrogen.nitrogen, 10);
    expect(Math.abs(up.demand.nitrogen / up.modelDemand.nitrogen - 1)).toBeLessThan(0.03);

    const csv = await treasurer.get(`/api/budgets/${res.body.id}/export?format=csv`);
    expect(csv.text).toContain('Published outlook');
    // At list prices instead: the gap per kg of N is named.
    const atList = await treasurer.post('/api/budgets/preview?units=metric').send({ name: 'x', source: { kind: 'outlook', outlookVersionId: pub.body.id, pricing: 'list', sideBySide: false }, bookingPlan });
    expect(atList.status).toBe(200);
    const listN = Math.min(...products.filter((p) => p.nPct > 0 && p.p2o5Pct === 0 && p.k2oPct === 0).map((p) => p.pricePerT / (p.nPct * 10)));
    const gap = nPrice('base') - listN;
    expect(atList.body.result.warnings.join('\n')).toContain(`N ${listN.toFixed(2)} EUR/kg N on the product list, ${nPrice('base').toFixed(2)} in the outlook's base scenario (gap ${gap >= 0 ? '+' : '−'}${Math.abs(gap).toFixed(2)} EUR/kg N)`);
    expect(atList.body.result.scenarios.map((s: { name: string }) => s.name)).toEqual(['Base']);
    // Booked a year late for this season under the calendar: said so.
    expect(atList.body.result.warnings).toContain(
      "Booked in Aug 2026, Oct 2026, Jan 2027: outside the months the co-op's season calendar gives for buying season 2026/27's inputs (Aug 2025 – Mar 2026); check the season or the booking plan",
    );
    const wrong = await treasurer.post('/api/budgets').send({ name: 'x', source: { kind: 'outlook', outlookVersionId: pub.body.id, scenario: 'medium' }, bookingPlan });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.details).toEqual([{ path: 'source.scenario', message: 'The outlook has no "medium" scenario (it has low, base, high)' }]);
  });

  it('a budget name that looks like a formula is escaped in the CSV', async () => {
    const created = (await treasurer.post('/api/budgets').send({ name: '=HYPERLINK("http://example.org")', source: { kind: 'manual', nKg: 1000, p2o5Kg: 0, k2oKg: 0 }, bookingPlan })).body;
    const csv = await treasurer.get(`/api/budgets/${created.id}/export?format=csv`);
    expect(csv.text).toContain(`"'=HYPERLINK(""http://example.org"")"`);
    expect(csv.text).not.toMatch(/,=HYPERLINK/);
  });
});
