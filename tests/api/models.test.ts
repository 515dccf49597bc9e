import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { DEMO_MODEL } from '../../seed/demo-model.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ jobs: true });
});
afterAll(async () => t.close());

const definition = DEMO_MODEL;

async function waitForRun(a: Awaited<ReturnType<typeof signedIn>>, id: number) {
  for (let i = 0; i < 600; i++) {
    const s = (await a.get(`/api/model-runs/${id}/status`)).body;
    if (['succeeded', 'failed', 'cancelled'].includes(s.status)) return s;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('run did not finish');
}

describe('model runs', () => {
  it('a second recorded fixed factor enters the fit beside land and can be set when evaluating', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const farms = (await planner.get('/api/farms')).body as { id: number; code: string }[];
    const seasons = (await planner.get('/api/seasons')).body as { id: number; label: string }[];
    // Invented irrigated areas, varying by farm and season, for every farm-season of the demo.
    for (const [fi, f] of farms.entries())
      for (const [si, s] of seasons.entries())
        expect((await planner.put('/api/records/factors').send({ farmId: f.id, seasonId: s.id, factor: 'irrigated_ha', value: 10 + ((fi * 13 + si * 7) % 50) })).status).toBe(200);
    const created = await planner.post('/api/models').send({ name: 'Land and irrigation', definition: { ...definition, fixedFactors: ['land_ha', 'irrigated_ha'], backtestSeasons: 0 } });
    const started = await planner.post(`/api/models/${created.body.id}/runs`);
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const done = await waitForRun(planner, started.body.id);
    expect(done.status, done.error).toBe('succeeded');
    const run = (await planner.get(`/api/model-runs/${started.body.id}`)).body;
    expect(run.result.summary.fixedFactors).toEqual(['land_ha', 'irrigated_ha', 'trend']);
    const ev = await planner.get(`/api/model-runs/${started.body.id}/evaluate?fixed=land_ha=300,irrigated_ha=25`);
    expect(ev.status, JSON.stringify(ev.body)).toBe(200);
    expect(ev.body.point.fixed.slice(0, 2)).toEqual([300, 25]); // in the order of the fixed factors
  });


  it('a planner defines a model, runs it in the background and reads a stored, reproducible result', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const created = await planner.post('/api/models').send({ name: 'All items, NQ, land + trend', definition });
    expect(created.status).toBe(201);
    const started = await planner.post(`/api/models/${created.body.id}/runs`);
    expect(started.status).toBe(202);
    expect(started.body.status).toBe('queued');
    const done = await waitForRun(planner, started.body.id);
    expect(done.status).toBe('succeeded');
    const run = (await planner.get(`/api/model-runs/${started.body.id}`)).body;
    expect(run.observations).toBe(400);
    expect(run.dataHash).toMatch(/^[0-9a-f]{64}$/);
    const summary = run.result.summary;
    expect(summary.form).toBe('normalized-quadratic');
    expect(summary.numeraire).toBe('labour');
    // The demo technology was built around these own-price elasticities (seed/technology.ts); a fit
    // to its noisy records lands near them. Invented demo data: a sanity band, not a reference value.
    const own = (code: string) => {
      const i = summary.items.findIndex((x: { name: string }) => x.name === code);
      return summary.elasticities[i][i];
    };
    expect(own('wheat')).toBeGreaterThan(0.1);
    expect(own('wheat')).toBeLessThan(0.7);
    expect(own('nitrogen')).toBeLessThan(-0.1);
    expect(own('nitrogen')).toBeGreaterThan(-0.9);
    for (const row of summary.elasticities as number[][]) expect(Math.abs(row.reduce((a, b) => a + b, 0))).toBeLessThan(1e-9);
    expect(run.result.backtest.seasons).toHaveLength(5);
    expect(run.result.fittedBySeason).toHaveLength(20);

    // Run it again from the stored snapshot: identical numbers.
    const again = await planner.post(`/api/model-runs/${started.body.id}/rerun`);
    expect(again.status).toBe(202);
    await waitForRun(planner, again.body.id);
    const second = (await planner.get(`/api/model-runs/${again.body.id}`)).body;
    expect(second.dataHash).toBe(run.dataHash);
    expect(second.rerunOf).toBe(run.id);
    expect(second.result.fit.theta).toEqual(run.result.fit.theta);
    expect(second.result.summary.elasticities).toEqual(summary.elasticities);

    const ev = await planner.get(`/api/model-runs/${run.id}/evaluate?prices=nitrogen=2`);
    expect(ev.status).toBe(200);
    expect(ev.body.point.prices[summary.items.findIndex((x: { name: string }) => x.name === 'nitrogen')]).toBe(2);

    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    expect((await treasurer.get(`/api/model-runs/${run.id}`)).status).toBe(200);
    expect((await treasurer.post(`/api/models/${created.body.id}/runs`)).status).toBe(403);
    const member = await signedIn(t.app, 'member@example.org');
    expect((await member.get(`/api/model-runs/${run.id}`)).status).toBe(403);
  });

  it('a definition whose numeraire is not among the items answers 400 naming the field', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const res = await planner.post('/api/models').send({ name: 'x', definition: { ...definition, numeraire: 'urea' } });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([{ path: 'body.definition.numeraire', message: 'The numeraire must be one of the chosen items' }]);
  });
});
