/**
 * Season set-ups the booking tests share: a model fitted without back-test (for speed), an outlook
 * projected on it and published, and a treasurer's budget with its booking round.
 */
import { expect } from 'vitest';
import type { signedIn } from './test-app.js';
import { demoModel } from '../../seed/demo-model.js';
import { until } from '../polling.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;

/** Fits the demo model on the seasons up to `fittedTo`, projects `season` on it and publishes it without mail. */
export async function publishOutlook(planner: Agent, o: { fittedTo: string; season: string; name: string; title: string }) {
  const model = await planner.post('/api/models').send({ name: o.name, definition: demoModel({ toSeason: o.fittedTo, backtestSeasons: 0 }) });
  expect(model.status).toBe(201);
  const run = await planner.post(`/api/models/${model.body.id}/runs`);
  const status = await until('the fit', async () => {
    const s = (await planner.get(`/api/model-runs/${run.body.id}/status`)).body;
    return ['succeeded', 'failed', 'cancelled'].includes(s.status) ? s : undefined;
  }, 240_000);
  expect(status.status).toBe('succeeded');
  const outlook = await planner.post('/api/outlooks').send({ season: o.season, modelRunId: run.body.id, title: o.title });
  expect(outlook.status).toBe(201);
  expect((await planner.post(`/api/outlooks/${outlook.body.id}/projection`)).status).toBe(202);
  const projection = await until('the projection', async () => {
    const p = (await planner.get(`/api/outlooks/${outlook.body.id}/projection`)).body;
    return p.status === 'succeeded' || p.status === 'failed' ? p : undefined;
  }, 240_000);
  expect(projection.status).toBe('succeeded');
  const pub = await planner.post(`/api/outlooks/${outlook.body.id}/publish`).send({ notifyMembers: false, acceptWeakSkill: true });
  expect(pub.status).toBe(201);
  return outlook.body.id as number;
}

/** The treasurer's budget (prices as in tests/api/bookings.test.ts) and the season's booking round on it. */
export async function openBookingRound(treasurer: Agent, season: string) {
  const budget = await treasurer.post('/api/budgets').send({
    name: `Bookings ${season}`,
    source: { kind: 'manual', nKg: 400_000, p2o5Kg: 100_000, k2oKg: 120_000 },
    bookingPlan: { months: [{ month: '2026-12', share: 1, prepay: true }], prepayDiscountPct: 2.5, paymentTermsDays: 30, deliveryMonth: '2027-03', financingRatePct: null },
  });
  expect(budget.status).toBe(201);
  const round = await treasurer.put('/api/bookings/rounds').send({ season, budgetId: budget.body.id, discountDeadline: '2099-01-31', vatPct: 20 });
  expect(round.status).toBe(200);
  return budget.body.id as number;
}
