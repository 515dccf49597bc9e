import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { farmRecords } from '../../server/db/schema/index.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { DEMO_BUDGET_NAME, DEMO_MODEL_NAME, DEMO_OUTLOOK_SEASON, demoSetupPending, demoSetupState } from '../../seed/prepare-demo.js';
import { until } from '../polling.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ jobs: true, prepareDemo: true });
}, 60_000);
afterAll(async () => t?.close());

describe('the demo co-op arrives alive (issue 16)', () => {
  it('Home says the demo is being prepared, then every role sees a fitted model, a published outlook and a budget', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    // Right after the load the preparation is queued or running, and Home says so.
    const first = (await planner.get('/api/summary')).body;
    expect(first.demo?.status).toBe('preparing');

    const end = Date.now() + 240_000;
    await until('the demo preparation', async () => ((await demoSetupPending(t.database.db)) ? undefined : true), end - Date.now(), 250);
    expect(await demoSetupState(t.database.db)).toBeNull();

    const modelsList = (await planner.get('/api/models')).body as { name: string; definition: { spec: string }; runs: { id: number; status: string }[] }[];
    const demo = modelsList.find((m) => m.name === DEMO_MODEL_NAME)!;
    expect(demo.definition.spec).toBe('per-hectare');
    expect(demo.runs[0]!.status).toBe('succeeded');

    const choice = (await planner.get('/api/outlooks/run-choice')).body;
    const outlooksList = (await planner.get('/api/outlooks')).body as { id: number; season: string; modelRunId: number }[];
    const outlook = outlooksList.find((o) => o.season === DEMO_OUTLOOK_SEASON)!;
    expect(outlook.modelRunId).toBe(choice.favoured.runId);

    const member = await signedIn(t.app, 'member@example.org');
    const portal = await member.get('/api/portal/outlook');
    expect(portal.status).toBe(200);
    expect(portal.body.season.label).toBe(DEMO_OUTLOOK_SEASON);

    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const budgetsList = (await treasurer.get('/api/budgets')).body as { name: string; sourceKind: string; baseCash: number }[];
    const budget = budgetsList.find((b) => b.name === DEMO_BUDGET_NAME)!;
    expect(budget.sourceKind).toBe('outlook');
    expect(budget.baseCash).toBeGreaterThan(0);

    // Home's next steps: records for the outlook's season are still to come; nothing else is waiting.
    const after = (await planner.get('/api/summary')).body;
    expect(after.demo).toBeNull();
    expect(after.lastRecordedSeason).toBe('2025/26');
    expect(after.nextSteps.map((s: { kind: string }) => s.kind)).toEqual(['records-missing']);
    expect(after.nextSteps[0].text).toMatch(/^No farm has records for 2026\/27 yet; the newest recorded season is 2025\/26\./);
    expect((await treasurer.get('/api/summary')).body.nextSteps).toEqual([]);
    // A new price changes the data: the planner is told to fit again; the treasurer is not.
    const [rec] = await t.database.db.select().from(farmRecords).limit(1);
    await t.database.db.update(farmRecords).set({ quantity: rec!.quantity + 1 }).where(and(eq(farmRecords.farmId, rec!.farmId), eq(farmRecords.seasonId, rec!.seasonId), eq(farmRecords.itemId, rec!.itemId)));
    const stale = (await planner.get('/api/summary')).body.nextSteps as { kind: string; text: string }[];
    expect(stale.map((s) => s.kind)).toEqual(['records-missing', 'model-stale']);
    expect(stale[1]!.text).toMatch(/^The data changed since run #\d+ of “Demo co-op, per hectare” was fitted on \d{1,2} [A-Z][a-z]{2} \d{4}\. Fit the model again/);
    expect((await treasurer.get('/api/summary')).body.nextSteps).toEqual([]);
    // A draft for the season after: drafted but not published, and its season has no records either.
    expect((await planner.post('/api/outlooks').send({ season: '2027/28', modelRunId: choice.favoured.runId })).status).toBe(201);
    const drafted = (await planner.get('/api/summary')).body.nextSteps as { kind: string; text: string }[];
    expect(drafted.map((s) => s.kind)).toEqual(['records-missing', 'records-missing', 'model-stale', 'outlook-unpublished']);
    expect(drafted[3]!.text).toBe('The 2027/28 outlook is drafted but not published: members cannot read it yet.');

    // Published: the treasurer is told the new outlook has no budget; the planner's step is gone.
    const draftId = (await planner.get('/api/outlooks')).body.find((o: { season: string }) => o.season === '2027/28').id;
    expect((await planner.post(`/api/outlooks/${draftId}/projection`)).status).toBe(202);
    const projected = async () => ['succeeded', 'failed'].includes((await planner.get(`/api/outlooks/${draftId}/projection`)).body.status);
    await until('the projection', async () => ((await projected()) ? true : undefined), end - Date.now(), 250);
    const pub = await planner.post(`/api/outlooks/${draftId}/publish`).send({ notifyMembers: false, acceptWeakSkill: true });
    expect(pub.status).toBe(201);
    const day = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(new Date());
    expect((await treasurer.get('/api/summary')).body.nextSteps).toEqual([
      {
        kind: 'budget-missing',
        icon: 'request_quote',
        text: `The 2027/28 outlook (version 1, published ${day}) has no fertiliser budget yet. Build one from its price scenarios.`,
        link: { path: '/budget', label: 'Open budgets' },
      },
    ]);
    expect(((await planner.get('/api/summary')).body.nextSteps as { kind: string }[]).map((s) => s.kind)).toEqual(['records-missing', 'records-missing', 'model-stale']);
    // A change to the published draft: the planner is told members still read version 1.
    expect((await planner.patch(`/api/outlooks/${draftId}`).send({ commentary: 'Changed after publishing' })).status).toBe(200);
    const changed = ((await planner.get('/api/summary')).body.nextSteps as { kind: string; text: string }[]).find((s) => s.kind === 'outlook-changed')!;
    expect(changed.text).toBe(`The 2027/28 outlook has changes since version 1 (published ${day}); members read version 1 until you publish again.`);
  }, 400_000);
});
