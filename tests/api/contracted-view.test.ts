/**
 * Issue 19: the contracted view of an outlook. The season's signed contracts are evaluated against
 * the outlook's model run at its base prices in a worker thread (a job with progress); the figures
 * the API answers are the engine's own for the same inputs (evaluateContracted run here in the test
 * thread), the margin per tonne is the contract price less the marginal cost, and the contract-based
 * input demand replaces the contracting farms' projection by their conditional demand. A member sees
 * their own contract with their farm's figures and no other farm's.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ContractedState, MyContracts } from '../../shared/contracted-view.js';
import type { ContractRow } from '../../shared/contract-schemas.js';
import { runContractedTask } from '../../server/outlook/contracted-task.js';
import { gatherProjectionInputs } from '../../server/outlook/projection-service.js';
import { mailOutbox, outlooks, outlookVersions } from '../../server/db/schema/index.js';
import { eq } from 'drizzle-orm';
import { demoModel } from '../../seed/demo-model.js';
import { coopElasticities } from '../../server/budget/model-demand.js';
import type { FitResult } from '../../server/estimation/index.js';
import { getRun } from '../../server/models/models-service.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { until } from '../polling.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
let planner: Agent;
let outlookId: number;
beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
  // The demo model with the schema's default five-season back-test.
  const definition = demoModel({ backtestSeasons: 5 });
  const model = await planner.post('/api/models').send({ name: 'Per hectare', definition });
  const run = await planner.post(`/api/models/${model.body.id}/runs`);
  await until('the fit', async () => {
    const s = (await planner.get(`/api/model-runs/${run.body.id}/status`)).body;
    if (s.status === 'failed') throw new Error(s.error);
    return s.status === 'succeeded' ? s : undefined;
  }, 300_000);
  const created = await planner.post('/api/outlooks').send({ season: '2026/27', modelRunId: run.body.id });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  outlookId = created.body.id;
  await planner.patch(`/api/outlooks/${outlookId}`).send({ draws: 500 });
  await planner.post(`/api/outlooks/${outlookId}/projection`);
  await until('the projection', async () => {
    const p = (await planner.get(`/api/outlooks/${outlookId}/projection`)).body;
    if (p.status === 'failed') throw new Error(p.error);
    return p.status === 'succeeded' ? p : undefined;
  }, 300_000);
}, 600_000);
afterAll(async () => t?.close());

describe('the contracted view of an outlook', () => {
  let state: ContractedState;

  it('is computed off the request thread, with progress, and answers the engine’s own figures', async () => {
    expect((await planner.get(`/api/contracts/outlooks/${outlookId}/evaluation`)).body).toMatchObject({ status: 'none', view: null });
    const started = await planner.post(`/api/contracts/outlooks/${outlookId}/evaluation`);
    expect(started.status).toBe(202);
    expect(['queued', 'running', 'succeeded']).toContain(started.body.status);
    state = await until('the evaluation', async () => {
      const s = (await planner.get(`/api/contracts/outlooks/${outlookId}/evaluation`)).body as ContractedState;
      if (s.status === 'failed') throw new Error(s.error ?? 'failed');
      return s.status === 'succeeded' ? s : undefined;
    }, 300_000);
    const view = state.view!;
    expect(state.stale).toBe(false);
    // The demo's signed and delivered contracts of 2026/27; the offer and the cancelled one are left out.
    const all = (await planner.get('/api/contracts')).body as ContractRow[];
    const season = all.filter((c) => c.season === '2026/27');
    expect(view.contracts.map((c) => c.reference).sort()).toEqual(season.filter((c) => c.status === 'signed' || c.status === 'delivered').map((c) => c.reference).sort());
    expect(view.leftOut).toEqual({ offered: season.filter((c) => c.status === 'offered').length, cancelled: season.filter((c) => c.status === 'cancelled').length });

    // The same evaluation in the test thread from the same inputs gives the same numbers.
    const [o] = await t.database.db.select().from(outlooks).where(eq(outlooks.id, outlookId));
    const inputs = await gatherProjectionInputs(t.database.db, o!);
    const f01 = inputs.farms.find((f) => f.code === 'F01')!;
    const wheat = view.contracts.find((c) => c.farmCode === 'F01' && c.itemCode === 'wheat')!;
    const farmSpec = view.evaluation.farms.find((f) => f.farm === 'F01')!;
    expect(farmSpec.outputs['wheat']!.quantity).toBe(wheat.quantity);
    const base = inputs.scenarios.find((s) => s.name === 'base')!.prices;
    const direct = runContractedTask({
      model: inputs.forecast!,
      options: { farms: [{ farm: 'F01', fixed: f01.fixed, contracted: { wheat: wheat.quantity }, contractPrices: { wheat: wheat.price } }], prices: base, season: 2026, draws: 0 },
    });
    expect(direct.ok).toBe(true);
    const d = direct.ok ? direct.result.farms[0]! : null;
    expect(farmSpec.outputs['wheat']!.marginalCost!.point).toBeCloseTo(d!.outputs['wheat']!.marginalCost!.point, 8);
    expect(farmSpec.inputs['nitrogen']!.point).toBeCloseTo(d!.inputs['nitrogen']!.point, 6);
    // Margin per tonne = contract price − marginal cost, at the point.
    const out = farmSpec.outputs['wheat']!;
    expect(out.contractPrice).toBe(wheat.price);
    expect(out.margin!.point).toBeCloseTo(wheat.price - out.marginalCost!.point, 9);
    expect(out.marginalCost!.p5).toBeLessThanOrEqual(out.marginalCost!.p95);
  }, 600_000);

  it('puts contract-based input demand beside the outlook’s: contracting farms at their conditional demand, the rest unchanged', async () => {
    const view = state.view!;
    const basis = view.demandBasis!;
    expect(basis.rows.map((r) => r.item).sort()).toEqual(['diesel', 'labour', 'nitrogen', 'phosphate', 'potash']);
    const projection = (await planner.get(`/api/outlooks/${outlookId}/projection`)).body.result;
    const n = basis.rows.find((r) => r.item === 'nitrogen')!;
    const coopN = projection.coop.items.find((i: { item: string }) => i.item === 'nitrogen').scenarios.base.point;
    expect(n.outlook.point).toBeCloseTo(coopN, 6);
    const evaluated = new Set(view.evaluation.farms.filter((f) => f.evaluated).map((f) => f.farm));
    let expected = 0;
    for (const f of projection.farms as { code: string; items: { item: string; scenarios: { base: { point: number } } }[] }[]) {
      expected += evaluated.has(f.code) ? view.evaluation.farms.find((x) => x.farm === f.code)!.inputs['nitrogen']!.point : f.items.find((i) => i.item === 'nitrogen')!.scenarios.base.point;
    }
    expect(n.contracted.point).toBeCloseTo(expected, 6);
  });

  it('goes stale when a contract changes, and a member sees their own contract with their farm’s figures only', async () => {
    const member = await signedIn(t.app, 'member@example.org');
    const mine = (await member.get('/api/contracts/mine')).body as MyContracts;
    expect(mine.farmName).toBe('Hollybrook Farm');
    expect(new Set(mine.contracts.map((c) => c.farmCode))).toEqual(new Set(['F01']));
    const wheat = mine.contracts.find((c) => c.itemCode === 'wheat' && c.status === 'signed')!;
    const fig = mine.figures[wheat.id]!;
    const f01 = state.view!.evaluation.farms.find((f) => f.farm === 'F01')!;
    expect(fig.marginalCost!.point).toBe(f01.outputs['wheat']!.marginalCost!.point);
    expect(mine.nutrients[0]!.items.map((i) => i.item)).toEqual(['nitrogen', 'phosphate', 'potash']);
    expect(mine.caution).toContain('not financial advice');
    expect((await member.get(`/api/contracts/outlooks/${outlookId}/evaluation`)).status).toBe(403);

    // The outlook e-mail carries the same sentences, with the caution.
    const pub = await planner.post(`/api/outlooks/${outlookId}/publish`).send({ notifyMembers: true, acceptWeakSkill: true });
    expect(pub.status, JSON.stringify(pub.body)).toBe(201);
    const mails = await t.database.db.select().from(mailOutbox).where(eq(mailOutbox.toAddress, 'member@example.org'));
    const text = mails[mails.length - 1]!.textBody;
    const mc = fig.marginalCost!;
    const whole = (v: number) => Math.round(v).toLocaleString('en-GB');
    expect(text).toContain(
      `Your contract ${wheat.reference}: ${wheat.quantity.toLocaleString('en-GB')} t of wheat at ${wheat.price} EUR/t; estimated marginal cost at that tonnage ${whole(mc.point)} EUR/t (likely range ${whole(mc.p5)} to ${whole(mc.p95)} EUR/t).`,
    );
    const nKg = mine.nutrients[0]!.items[0]!.band.point;
    expect(text).toContain(`For this contracted output in 2026/27 your farm needs about ${nKg >= 1000 ? `${(nKg / 1000).toLocaleString('en-GB', { maximumFractionDigits: nKg >= 100_000 ? 0 : 1 })} t N` : ''}`);
    expect(text).toContain('not financial advice');
    expect(mails[mails.length - 1]!.htmlBody).toContain('Your delivery contracts');

    const edit = await planner.put(`/api/contracts/${wheat.id}`).send({ ...wheat, quantity: wheat.quantity + 10, version: wheat.version });
    expect(edit.status).toBe(200);
    expect((await planner.get(`/api/contracts/outlooks/${outlookId}/evaluation`)).body.stale).toBe(true);
  });

  it('bases a fertiliser budget on contracted output: its nutrient demand is the contract basis, not the outlook’s', async () => {
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const view = state.view!;
    const projection = (await planner.get(`/api/outlooks/${outlookId}/projection`)).body.result;
    const bookingPlan = { months: [{ month: '2026-08', share: 0.5, prepay: true }, { month: '2026-10', share: 0.5, prepay: false }], prepayDiscountPct: 2, paymentTermsDays: 30, deliveryMonth: '2027-02' };
    const body = { name: 'On contracts 2026/27', source: { kind: 'contracted', outlookId }, bookingPlan };
    const created = await treasurer.post('/api/budgets?units=metric').send(body);
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const r = created.body.result;
    expect(r.source.kind).toBe('contracted');
    // The demo's nitrogen, phosphate and potash items are measured in kg of the nutrient (seed/technology.ts).
    expect(r.source.detail.nutrientItems).toEqual({ nitrogen: { code: 'nitrogen', kgPerUnit: 1 }, phosphate: { code: 'phosphate', kgPerUnit: 1 }, potash: { code: 'potash', kgPerUnit: 1 } });
    // The conditional demand of each contracting farm (the evaluation's) plus every other farm's projection.
    const evaluated = new Set(view.evaluation.farms.filter((f) => f.evaluated).map((f) => f.farm));
    for (const n of ['nitrogen', 'phosphate', 'potash'] as const) {
      let expected = 0;
      for (const f of projection.farms as { code: string; items: { item: string; scenarios: { base: { point: number } } }[] }[])
        expected += evaluated.has(f.code) ? view.evaluation.farms.find((x) => x.farm === f.code)!.inputs[n]!.point : f.items.find((i) => i.item === n)!.scenarios.base.point;
      expect(r.demand.base[n]).toBeCloseTo(expected, 4);
      expect(r.scenarios[0].demand[n]).toBeCloseTo(expected, 4);
      expect(r.demand.base[n]).toBeCloseTo(view.demandBasis!.rows.find((x) => x.item === n)!.contracted.point, 6);
    }
    expect(r.demand.base.nitrogen).toBeGreaterThan(0);
    // The contract was edited after the evaluation (above): the budget says so.
    expect(r.warnings.join(' ')).toMatch(/changed after this contract evaluation/);

    // The outlook-based budget on the published version of the same projection differs by the contracting farms.
    const [version] = await t.database.db.select().from(outlookVersions).where(eq(outlookVersions.outlookId, outlookId));
    const onOutlook = await treasurer.post('/api/budgets/preview?units=metric').send({ ...body, name: 'On the outlook', source: { kind: 'outlook', outlookVersionId: version!.id, pricing: 'list', sideBySide: false } });
    expect(onOutlook.status, JSON.stringify(onOutlook.body)).toBe(200);
    const outlookN = onOutlook.body.result.demand.base.nitrogen;
    expect(outlookN).toBeCloseTo(projection.coop.items.find((i: { item: string }) => i.item === 'nitrogen').scenarios.base.point, 4);
    expect(Math.abs(r.demand.base.nitrogen - outlookN)).toBeGreaterThan(1);
    expect(r.source.detail.outlookDemand.nitrogen).toBeCloseTo(outlookN, 4);

    // Saved, read back and saved again: the same figures.
    const read = await treasurer.get(`/api/budgets/${created.body.id}?units=metric`);
    expect(read.status).toBe(200);
    expect(read.body.source).toEqual({ kind: 'contracted', outlookId });
    expect(read.body.result.demand.base).toEqual(r.demand.base);
    const put = await treasurer.put(`/api/budgets/${created.body.id}?units=metric`).send({ ...body, source: read.body.source, name: 'On contracts, again' });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    expect(put.body.result.demand.base).toEqual(r.demand.base);
    expect(put.body.result.source.detail.evaluationId).toBe(r.source.detail.evaluationId);

    // An outlook without a finished evaluation: a clear message naming the field.
    const none = await treasurer.post('/api/budgets/preview').send({ ...body, source: { kind: 'contracted', outlookId: 999_999 } });
    expect(none.status).toBe(422);
    expect(JSON.stringify(none.body)).toMatch(/source\.outlookId/);
    expect(JSON.stringify(none.body)).toMatch(/no finished contract evaluation/);
  });

  it('moves the contract basis with a fertiliser price scenario by the conditional responses: nitrogen +20 % lowers its nitrogen tonnage as the elasticities imply', async () => {
    // Output is held at the contracted tonnage, so on the contracting farms only the input mix responds,
    // by their conditional (cost-side, Shephard) elasticities from the evaluation
    // (docs/cost-duality.md §4.1); every other farm responds as on the outlook basis (Hotelling).
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const view = state.view!;
    const projection = (await planner.get(`/api/outlooks/${outlookId}/projection`)).body.result;
    const bookingPlan = { months: [{ month: '2026-08', share: 1, prepay: false }], prepayDiscountPct: 0, paymentTermsDays: 30, deliveryMonth: '2027-02' };
    const res = await treasurer
      .post('/api/budgets/preview?units=metric')
      .send({ name: 'Contracts, dear N', source: { kind: 'contracted', outlookId }, bookingPlan, scenarios: [{ name: 'Nitrogen +20 %', priceChanges: { nitrogen: 20 } }] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const r = res.body.result;
    expect(r.demand.elasticitySource).toBe('contracts');
    expect(r.warnings.join(' ')).not.toMatch(/hold the (contract-based|nutrient) demand fixed/);

    // The co-op's nitrogen own-price elasticity on the contract basis, from the evaluation's own figures:
    // each contracting farm's conditional demand × its conditional elasticity, plus the other farms'
    // demand × the profit function's elasticity at their points (docs/cost-duality.md §4.1).
    const evaluated = new Map(view.evaluation.farms.filter((f) => f.evaluated).map((f) => [f.farm, f]));
    const farms = projection.farms as { code: string; fixed: Record<string, number> }[];
    let held = 0;
    let heldResponse = 0;
    for (const f of farms.filter((x) => evaluated.has(x.code))) {
      const e = evaluated.get(f.code)!;
      const table = e.elasticities!.conditional;
      const eNN = table.values[table.rows.indexOf('nitrogen')]![table.columns.indexOf('nitrogen')]!;
      // Conditional demands slope down in their own price (concave cost function, docs/cost-duality.md §1).
      expect(eNN).toBeLessThan(0);
      held += e.inputs['nitrogen']!.point;
      heldResponse += e.inputs['nitrogen']!.point * eNN;
    }
    expect(held).toBeGreaterThan(0);
    const base = projection.scenarios.find((s: { name: string }) => s.name === 'base').prices;
    const fit = ((await getRun(t.database.db, view.modelRunId)).result as { fit: FitResult }).fit;
    const others = farms.filter((x) => !evaluated.has(x.code)).map((x) => ({ fixed: x.fixed }));
    const freeE = coopElasticities(fit, others, base, r.source.detail.nutrientItems);
    const X = r.demand.base.nitrogen;
    const eNN = (heldResponse + (X - held) * freeE.nitrogen.nitrogen) / X;
    expect(r.demand.elasticities.nitrogen.nitrogen).toBeCloseTo(eNN, 9);
    const scenario = r.scenarios.find((s: { name: string }) => s.name === 'Nitrogen +20 %');
    // x' = x · 1.2^e (the budget's constant-elasticity form, docs/fertiliser.md): lower by X·(1 − 1.2^e).
    expect(scenario.demand.nitrogen).toBeCloseTo(X * 1.2 ** eNN, 3);
    expect(X - scenario.demand.nitrogen).toBeCloseTo(X * (1 - 1.2 ** eNN), 3);
    expect(scenario.demand.nitrogen).toBeLessThan(X - 1);
    // Phosphate and potash move by their cross-price responses to nitrogen, not by nothing.
    for (const n of ['phosphate', 'potash'] as const) expect(scenario.demand[n]).toBeCloseTo(r.demand.base[n] * 1.2 ** r.demand.elasticities[n].nitrogen, 3);
    // The exact figure beside it asks the engine again at the higher price: close to the first-order one.
    expect(scenario.modelDemand.nitrogen).toBeLessThan(X);
    expect(Math.abs(scenario.modelDemand.nitrogen / scenario.demand.nitrogen - 1)).toBeLessThan(0.01);
    // Le Chatelier (docs/cost-duality.md §4): with output held, nitrogen falls less than on the outlook basis of the same farms.
    expect(Math.abs(heldResponse / held)).toBeLessThanOrEqual(Math.abs(coopElasticities(fit, farms.filter((x) => evaluated.has(x.code)), base, r.source.detail.nutrientItems).nitrogen.nitrogen));
  });
});
