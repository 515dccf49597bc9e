/**
 * Brings the freshly loaded demo co-op to life: a fitted model (per-hectare forecasting model with a
 * back-test), the outlook for the coming season projected on the run the back-test favours and
 * published, and the treasurer's fertiliser budget built from it — so every demo account sees real
 * figures at first sign-in.
 *
 * Fitting is CPU work, so this runs as a background job (`demo-setup`) queued by the demo load
 * (`loadDemoCoop(db, { prepare: true })`, which `npm start` and `npm run seed` ask for). Each step
 * looks for what an earlier attempt already made, so a restart resumes where it stopped. Tests that
 * build their own database skip it unless they ask for it.
 */
import { and, desc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../server/db/client.js';
import { budgets, jobs, models, modelRuns, outlooks, outlookVersions, seasons, users } from '../server/db/schema/index.js';
import { enqueueJob } from '../server/jobs/job-queue.js';
import type { JobHandler } from '../server/jobs/job-runner.js';
import { createModel, startRun } from '../server/models/models-service.js';
import { runChoice } from '../server/outlook/run-choice.js';
import { createOutlook, startProjection } from '../server/outlook/outlook-drafts.js';
import { publishOutlook } from '../server/outlook/outlook-publishing.js';
import { createBudget } from '../server/budget/budget-service.js';
import { budgetInputSchema } from '../shared/budget-schemas.js';
import { defaultBookingMonths } from '../shared/season-calendar.js';
import { getSettings } from '../server/settings/settings-service.js';
import { modelDefinitionSchema } from '../shared/model-schemas.js';
import type { Config } from '../server/config.js';
import { FIRST_SEASON, SEASON_COUNT, seasonLabel } from './demo-coop.js';
import { demoModel } from './demo-model.js';

export const DEMO_SETUP_JOB = 'demo-setup';
export const DEMO_MODEL_NAME = 'Demo co-op, per hectare';
export const DEMO_BUDGET_NAME = 'Fertiliser purchases (demo)';
/** The season after the demo's last recorded one. */
export const DEMO_OUTLOOK_SEASON = seasonLabel(FIRST_SEASON + SEASON_COUNT);
const DEMO_OUTLOOK_START_YEAR = FIRST_SEASON + SEASON_COUNT;

/** Every demo item, land as the fixed factor, per-hectare forecasts, a three-season back-test. */
export const DEMO_MODEL_DEFINITION = demoModel({ spec: 'per-hectare' });

/** Queues the preparation (in the demo load's transaction). */
export async function enqueueDemoSetup(db: Db) {
  await enqueueJob(db, DEMO_SETUP_JOB, null, { stage: 'Waiting to start' });
}

/** The preparation while it is queued or running (null when none is, or it has finished). */
export async function demoSetupState(db: Db): Promise<{ status: 'preparing' | 'failed'; stage: string; error: string | null } | null> {
  const [row] = await db.select().from(jobs).where(eq(jobs.kind, DEMO_SETUP_JOB)).orderBy(desc(jobs.id)).limit(1);
  if (!row || row.status === 'done' || row.status === 'cancelled') return null;
  const stage = (row.payload as { stage?: string } | null)?.stage ?? 'Preparing';
  if (row.status === 'failed') return { status: 'failed', stage, error: row.error };
  return { status: 'preparing', stage, error: null };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitFor<T>(probe: () => Promise<T | undefined>, signal: AbortSignal, stopping: () => boolean, what: string, timeoutMs = 30 * 60_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    if (signal.aborted) throw new Error(`Cancelled while waiting for ${what}`);
    if (stopping()) throw new Error(`The server stopped while waiting for ${what}; the preparation resumes at the next start`);
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`${what} did not finish in time`);
    await sleep(500);
  }
}

async function account(db: Db, email: string, fallbackRole: 'planner' | 'treasurer') {
  const [byEmail] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, email));
  if (byEmail) return byEmail;
  const [byRole] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.role, fallbackRole)).limit(1);
  if (!byRole) throw new Error(`No ${fallbackRole} account to prepare the demo with`);
  return byRole;
}

/** The job: each step is skipped when an earlier attempt made it already. */
export function demoSetupJobHandler(db: Db, config: Pick<Config, 'publicUrl' | 'mailFrom'>, stopping: () => boolean = () => false): JobHandler {
  return async (job, { signal }) => {
    const stage = (text: string) => db.update(jobs).set({ payload: { stage: text } }).where(eq(jobs.id, job.id));
    const planner = await account(db, 'planner@example.org', 'planner');
    const treasurer = await account(db, 'treasurer@example.org', 'treasurer');

    // 1. The model and its fit.
    await stage('Fitting the demo model (about a minute)');
    let [model] = await db.select({ id: models.id }).from(models).where(eq(models.name, DEMO_MODEL_NAME));
    if (!model) model = await createModel(db, DEMO_MODEL_NAME, modelDefinitionSchema.parse(DEMO_MODEL_DEFINITION), planner.id);
    const runs = await db.select({ id: modelRuns.id, status: modelRuns.status }).from(modelRuns).where(eq(modelRuns.modelId, model.id)).orderBy(desc(modelRuns.id));
    let run = runs.find((r) => r.status === 'succeeded') ?? runs.find((r) => r.status === 'queued' || r.status === 'running');
    if (!run) run = await startRun(db, model.id, planner.id);
    const runId = run.id;
    const fitted = await waitFor(
      async () => {
        const [r] = await db.select({ status: modelRuns.status, error: modelRuns.error }).from(modelRuns).where(eq(modelRuns.id, runId));
        return r && ['succeeded', 'failed', 'cancelled'].includes(r.status) ? r : undefined;
      },
      signal,
      stopping,
      'The demo fit',
    );
    if (fitted.status !== 'succeeded') throw new Error(`The demo fit ${fitted.status}: ${fitted.error ?? 'no reason given'}`);

    // 2. The outlook for the coming season on the run the back-test favours.
    await stage(`Projecting the ${DEMO_OUTLOOK_SEASON} outlook`);
    const [season] = await db.select({ id: seasons.id }).from(seasons).where(eq(seasons.startYear, DEMO_OUTLOOK_START_YEAR));
    let [outlook] = season ? await db.select().from(outlooks).where(eq(outlooks.seasonId, season.id)) : [];
    if (!outlook) {
      const favoured = (await runChoice(db)).favoured?.runId ?? runId;
      const created = await createOutlook(db, { season: DEMO_OUTLOOK_SEASON, title: `Season outlook ${DEMO_OUTLOOK_SEASON}`, modelRunId: favoured }, planner.id);
      [outlook] = await db.select().from(outlooks).where(eq(outlooks.id, created.id));
    }
    const outlookId = outlook!.id;
    let [version] = await db.select({ id: outlookVersions.id }).from(outlookVersions).where(eq(outlookVersions.outlookId, outlookId)).orderBy(desc(outlookVersions.version)).limit(1);
    if (!version) {
      if (outlook!.projectionStatus !== 'queued' && outlook!.projectionStatus !== 'running' && outlook!.projectionStatus !== 'succeeded') await startProjection(db, outlookId, planner.id);
      const projected = await waitFor(
        async () => {
          const [o] = await db.select({ status: outlooks.projectionStatus, error: outlooks.projectionError }).from(outlooks).where(eq(outlooks.id, outlookId));
          return o && (o.status === 'succeeded' || o.status === 'failed') ? o : undefined;
        },
        signal,
        stopping,
        'The demo projection',
      );
      if (projected.status !== 'succeeded') throw new Error(`The demo projection failed: ${projected.error ?? 'no reason given'}`);
      await stage(`Publishing the ${DEMO_OUTLOOK_SEASON} outlook`);
      // Demo members get no e-mail: their addresses are invented.
      const published = await publishOutlook(
        db,
        config,
        outlookId,
        { commentary: 'Prepared with the demo co-op: expected prices are last season’s, and the model is the one its back-test favours.', notifyMembers: false, acceptWeakSkill: true },
        planner,
      );
      version = { id: published.id };
    }

    // 3. The treasurer's budget from the published outlook's base scenario.
    await stage('Building the treasurer’s fertiliser budget');
    const [existing] = await db.select({ id: budgets.id }).from(budgets).where(eq(budgets.name, DEMO_BUDGET_NAME));
    if (!existing) {
      // The co-op's season calendar decides when inputs are bought (shared/season-calendar.ts).
      const { seasonCalendar } = await getSettings(db);
      const plan = defaultBookingMonths(seasonCalendar, DEMO_OUTLOOK_START_YEAR);
      const input = budgetInputSchema.parse({
        name: DEMO_BUDGET_NAME,
        source: { kind: 'outlook', outlookVersionId: version.id, scenario: 'base' },
        bookingPlan: {
          months: plan.months.map((m) => ({ month: m.month, share: m.sharePct / 100, prepay: m.prepay })),
          prepayDiscountPct: 0,
          paymentTermsDays: 30,
          deliveryMonth: plan.deliveryMonth,
          financingRatePct: null,
        },
        scenarios: [{ name: 'Nitrogen dearer', priceChanges: { nitrogen: 20 } }],
      });
      await createBudget(db, input, treasurer.id, 'metric');
    }
    await stage('Done');
  };
}

/** Whether the demo preparation is still queued or running (tests wait on it). */
export async function demoSetupPending(db: Db): Promise<boolean> {
  const rows = await db.select({ id: jobs.id }).from(jobs).where(and(eq(jobs.kind, DEMO_SETUP_JOB), inArray(jobs.status, ['queued', 'running'])));
  return rows.length > 0;
}
