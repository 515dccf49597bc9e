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
import { mailOutbox, outlooks } from '../../server/db/schema/index.js';
import { eq } from 'drizzle-orm';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
let planner: Agent;
let outlookId: number;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until<T>(what: string, probe: () => Promise<T | undefined>, ms = 300_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(150);
  }
}

beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
  const definition = { items: ['wheat', 'canola', 'nitrogen', 'phosphate', 'potash', 'diesel', 'labour'], numeraire: 'labour', fixedFactors: ['land_ha'], trend: true, form: 'nq', curvature: 'auto' };
  const model = await planner.post('/api/models').send({ name: 'Per hectare', definition });
  const run = await planner.post(`/api/models/${model.body.id}/runs`);
  await until('the fit', async () => {
    const s = (await planner.get(`/api/model-runs/${run.body.id}/status`)).body;
    if (s.status === 'failed') throw new Error(s.error);
    return s.status === 'succeeded' ? s : undefined;
  });
  const created = await planner.post('/api/outlooks').send({ season: '2026/27', modelRunId: run.body.id });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  outlookId = created.body.id;
  await planner.patch(`/api/outlooks/${outlookId}`).send({ draws: 500 });
  await planner.post(`/api/outlooks/${outlookId}/projection`);
  await until('the projection', async () => {
    const p = (await planner.get(`/api/outlooks/${outlookId}/projection`)).body;
    if (p.status === 'failed') throw new Error(p.error);
    return p.status === 'succeeded' ? p : undefined;
  });
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
    });
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
});
