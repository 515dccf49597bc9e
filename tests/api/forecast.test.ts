import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { demoModel } from '../../seed/demo-model.js';
import { until } from '../polling.js';

/**
 * The forecasting model of a model run (per hectare with farm and season effects, or pooled), its
 * back-test against the plain rules, the run the outlook favours, and the warning before publishing
 * (docs/forecasting.md §7, §9). On the invented demo co-op (seed/demo-coop.ts).
 */
type Agent = Awaited<ReturnType<typeof signedIn>>;

let t: TestApp;
let planner: Agent;
const base = demoModel({ backtestSeasons: 5 });
const ITEMS = base.items;
async function fitted(name: string, definition: Record<string, unknown>) {
  const model = await planner.post('/api/models').send({ name, definition });
  expect(model.status, JSON.stringify(model.body)).toBe(201);
  const run = await planner.post(`/api/models/${model.body.id}/runs`);
  expect(run.status).toBe(202);
  const status = await until('the fit', async () => {
    const s = (await planner.get(`/api/model-runs/${run.body.id}/status`)).body;
    return ['succeeded', 'failed', 'cancelled'].includes(s.status) ? s : undefined;
  }, 180_000);
  expect(status.status, status.error).toBe('succeeded');
  return { model: model.body, run: (await planner.get(`/api/model-runs/${run.body.id}`)).body };
}

let perHa: Awaited<ReturnType<typeof fitted>>;
let pooled: Awaited<ReturnType<typeof fitted>>;

beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
  perHa = await fitted('Per hectare', { ...base, fixedFactors: ['land_ha'] });
  pooled = await fitted('Pooled', { ...base, fixedFactors: ['land_ha'], spec: 'pooled' });
}, 600_000);
afterAll(async () => t?.close());

describe('the specification of a model', () => {
  it('is per hectare by default when land is a fixed factor, pooled without land, and per hectare needs land', async () => {
    expect(perHa.model.definition.spec).toBe('per-hectare');
    expect(pooled.model.definition.spec).toBe('pooled');
    const noLand = await planner.post('/api/models').send({ name: 'No land', definition: { ...base, fixedFactors: [] } });
    expect(noLand.status).toBe(201);
    expect(noLand.body.definition.spec).toBe('pooled');
    const bad = await planner.post('/api/models').send({ name: 'Bad', definition: { ...base, fixedFactors: [], spec: 'per-hectare' } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual([{ path: 'body.definition.spec', message: 'A model per hectare needs land as a fixed factor' }]);
  });

  it('a run fits the chosen specification: farm effects for every farm and a season effect per season when per hectare', () => {
    const r = perHa.run.result;
    expect(r.spec).toBe('per-hectare');
    expect(r.forecastError).toBeNull();
    expect(r.forecast.spec).toBe('per-hectare');
    expect(r.forecast.farmEffects.farms).toHaveLength(20);
    expect(r.forecast.seasonEffects.seasons).toHaveLength(20);
    // The profit function in levels stays beside it (elasticities, budgets, the coefficient tables).
    expect(r.fit.layout.factors).toEqual(['land_ha', 'trend']);
    expect(pooled.run.result.spec).toBe('pooled');
    expect(pooled.run.result.forecast.spec).toBe('pooled');
    expect(pooled.run.result.forecast.farmEffects).toBeNull();
  });
});

describe('the back-test of a run', () => {
  it('sets the model against both plain rules per item, with coverage per third of farm size and for the co-op total', () => {
    const bt = perHa.run.result.skill;
    expect(bt.spec).toBe('per-hectare');
    expect(bt.level).toBe(0.9);
    expect(bt.origins.map((o: { season: string }) => o.season)).toEqual(['2021/22', '2022/23', '2023/24', '2024/25', '2025/26']);
    expect(bt.thirds.by).toBe('land');
    expect(bt.items.map((i: { item: string }) => i.item).sort()).toEqual([...ITEMS].sort());
    for (const it of bt.items) {
      // The ratio is the model's median farm error over the rule's (its own definition, not a second computation).
      expect(it.ratios.perHectare.mdape).toBeCloseTo(it.model.mdape / it.rules.perHectare.mdape, 12);
      expect(it.ratios.lastSeason.mdape).toBeCloseTo(it.model.mdape / it.rules.lastSeason.mdape, 12);
      // 20 farms in each of 5 seasons; the thirds split the same outcomes.
      expect(it.coverage.farms.total).toBe(100);
      expect(it.coverage.byThird.reduce((a: number, c: { total: number }) => a + c.total, 0)).toBe(100);
      expect(it.coverage.coop.total).toBe(5);
      expect(it.beatsRule).toBe(it.model.mdape <= it.rules.perHectare.mdape);
    }
    // What the demo co-op shows (docs/forecasting.md §10; invented data, for the demo only): the per-hectare
    // model is no worse than the per-hectare rule for any item, and its 90 % bands hold about 90 % of farm
    // outcomes overall and in every third of farm size. Acceptance limits of 87–93 % overall are the project's
    // own target (common practice, no source); ±5 points per third allows for about 230 outcomes per third.
    for (const it of bt.items) expect(it.beatsRule, it.item).toBe(true);
    const sum = (pick: (it: (typeof bt.items)[number]) => { held: number; total: number }) =>
      bt.items.reduce((a: { held: number; total: number }, it: (typeof bt.items)[number]) => ({ held: a.held + pick(it).held, total: a.total + pick(it).total }), { held: 0, total: 0 });
    const farms = sum((it) => it.coverage.farms);
    expect(farms.held / farms.total).toBeGreaterThanOrEqual(0.87);
    expect(farms.held / farms.total).toBeLessThanOrEqual(0.93);
    for (const k of [0, 1, 2]) {
      const third = sum((it) => it.coverage.byThird[k]);
      expect(Math.abs(third.held / third.total - 0.9)).toBeLessThanOrEqual(0.05);
    }
    // The season-by-season table of co-op totals comes from the same back-test.
    expect(perHa.run.result.backtest.seasons.map((s: { season: string }) => s.season)).toEqual(bt.origins.map((o: { season: string }) => o.season));
  });
});

describe('the outlook', () => {
  it('favours the run the back-test favours, not the newest, and says why', async () => {
    const choice = (await planner.get('/api/outlooks/run-choice')).body;
    expect(choice.runs.map((r: { runId: number }) => r.runId)).toEqual([pooled.run.id, perHa.run.id]);
    const a = choice.runs.find((r: { runId: number }) => r.runId === perHa.run.id);
    const b = choice.runs.find((r: { runId: number }) => r.runId === pooled.run.id);
    expect(a.itemsBeatingRule).toBeGreaterThan(b.itemsBeatingRule);
    expect(choice.favoured.runId).toBe(perHa.run.id);
    expect(choice.favoured.reason).toContain(`Run #${perHa.run.id} of “Per hectare”`);
    expect(choice.favoured.reason).toContain(`beat the plain per-hectare rule for ${a.itemsBeatingRule} of 7 items`);
    expect(choice.favoured.reason).toContain(`The next best, run #${pooled.run.id}`);
  });

  it('warns before publishing when the model did not beat the plain rule for an item; the planner may publish anyway and the warning is kept', async () => {
    const weak = (await planner.get('/api/outlooks/run-choice')).body.runs.find((r: { runId: number }) => r.runId === pooled.run.id);
    // On the demo's farms of 40–900 ha, one equation in farm totals misses the small farms' levels.
    expect(weak.weakItems.length).toBeGreaterThan(0);
    const created = await planner.post('/api/outlooks').send({ season: '2026/27', modelRunId: pooled.run.id });
    expect(created.status).toBe(201);
    const id = created.body.id;
    expect(created.body.skill.weakItems).toEqual(weak.weakItems);
    expect((await planner.patch(`/api/outlooks/${id}`).send({ draws: 500 })).status).toBe(200);
    expect((await planner.post(`/api/outlooks/${id}/projection`)).status).toBe(202);
    await until('the projection', async () => {
      const p = (await planner.get(`/api/outlooks/${id}/projection`)).body;
      return p.status === 'succeeded' ? p : p.status === 'failed' ? Promise.reject(new Error(p.error)) : undefined;
    }, 180_000);

    const refused = await planner.post(`/api/outlooks/${id}/publish`).send({ notifyMembers: false });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('weak_skill');
    expect(refused.body.error.details.map((d: { path: string }) => d.path)).toEqual(weak.weakItems.map((w: { item: string }) => `items.${w.item}`));
    expect((await planner.get(`/api/outlooks/${id}`)).body.versions).toHaveLength(0);

    const published = await planner.post(`/api/outlooks/${id}/publish`).send({ notifyMembers: false, acceptWeakSkill: true });
    expect(published.status, JSON.stringify(published.body)).toBe(201);
    const version = (await planner.get(`/api/outlooks/versions/${published.body.id}`)).body;
    expect(version.skill.weakItems).toEqual(weak.weakItems);
    const draft = (await planner.get(`/api/outlooks/${id}`)).body;
    expect(draft.published).toMatchObject({ version: 1, unchangedSince: true });
    // What the band covers, in words, kept with the version.
    expect(version.projection.band.spec).toBe('pooled');
    expect(version.projection.band.words).toContain('9 in 10');

    const admin = await signedIn(t.app, 'admin@example.org');
    const audit = (await admin.get('/api/audit?entity=outlook')).body as { rows?: unknown[] } | unknown[];
    const rows = (Array.isArray(audit) ? audit : (audit.rows ?? [])) as { action: string; after: { publishedDespite?: string[] } }[];
    const entry = rows.find((r) => r.action === 'outlook.publish');
    expect(entry?.after.publishedDespite).toEqual(weak.weakItems.map((w: { sentence: string }) => w.sentence));

    // A change after publishing makes it a draft again.
    expect((await planner.patch(`/api/outlooks/${id}`).send({ commentary: 'Changed afterwards' })).status).toBe(200);
    expect((await planner.get(`/api/outlooks/${id}`)).body.published).toMatchObject({ version: 1, unchangedSince: false });
  });

  it('projects with the per-hectare model: no farm band below zero, the co-op band of the sum, and says what the band covers', async () => {
    const created = await planner.post('/api/outlooks').send({ season: '2027/28', modelRunId: perHa.run.id });
    expect(created.status).toBe(201);
    const id = created.body.id;
    expect((await planner.patch(`/api/outlooks/${id}`).send({ draws: 1000 })).status).toBe(200);
    expect((await planner.post(`/api/outlooks/${id}/projection`)).status).toBe(202);
    const p = await until('the projection', async () => {
      const x = (await planner.get(`/api/outlooks/${id}/projection`)).body;
      return x.status === 'succeeded' ? x : x.status === 'failed' ? Promise.reject(new Error(x.error)) : undefined;
    }, 180_000);
    const r = p.result;
    expect(r.band.spec).toBe('per-hectare');
    expect(r.band.words).toContain('a good or bad season that moves every farm and every item together');
    for (const f of r.farms) for (const it of f.items) for (const q of Object.values(it.scenarios) as { p5: number; p95: number; median: number }[]) {
      expect(q.p5).toBeGreaterThanOrEqual(0);
      expect(q.p5).toBeLessThanOrEqual(q.median);
      expect(q.median).toBeLessThanOrEqual(q.p95);
    }
    // The co-op band is the band of the sum: narrower than the sum of the farms' bands, wider than
    // independent farms would make it when a season moves all of them (docs/forecasting.md §5).
    for (const item of r.coop.items) {
      const b = item.scenarios.base;
      const sumOfBands = r.farms.reduce((a: number, f: { items: { item: string; scenarios: { base: { p95: number; p5: number } } }[] }) => {
        const q = f.items.find((x) => x.item === item.item)!.scenarios.base;
        return a + (q.p95 - q.p5);
      }, 0);
      expect(b.p95 - b.p5).toBeLessThan(sumOfBands);
      expect(b.p5).toBeGreaterThanOrEqual(0);
    }
  });
});
