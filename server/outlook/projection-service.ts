/**
 * The season projection of an outlook draft: the run's forecasting model (projectForecast,
 * docs/forecasting.md §6, §9; projectSeason, §2.2, for a run stored without one) run in the worker
 * pool as a database-backed job, for every farm at its own fixed factors and the trend of the
 * outlook's season, at the low/base/high price scenarios;
 * then the tables the screens, the e-mails and the published snapshot show (quantities in item
 * units and tonnes, the co-op's deliveries against its storage and handling capacity, history for
 * fan charts).
 */
import type { ModelDefinition } from '../../shared/model-schemas.js';
import type { Db } from '../db/client.js';
import type { outlooks } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import type { JobHandler } from '../jobs/job-runner.js';
import type { WorkerPool } from '../jobs/worker-pool.js';
import type { FitRunResult } from '../jobs/fit-task.js';
import type { FitResult, ForecastModel, QuantitySummary } from '../estimation/index.js';
import type { OutlookProjectionResult, ProjectionTask } from './projection-task.js';
import { bandCoverWords } from '../../shared/band-words.js';
import type { ByScenario, CapacityComparison, CoopProjection, FarmOutlook, History, ItemProjection, ProjectionTables, ScenarioName, TotalBand } from '../../shared/outlook-types.js';
import { hashOf } from '../models/model-data.js';
import { getSettings } from '../settings/settings-service.js';
import { scenarioPrices, SCENARIO_RULE_TEXT, type ScenarioRule } from './expectations.js';
import type { ItemExpectation } from './expectations-service.js';
import { curvatureCaution } from './outlook-cautions.js';
import { isDeliveredInTonnes, tonnesOf } from './capacity-tonnes.js';
import { findOutlook, seasonById, updateOutlook, type OutlookRow } from './outlook-repository.js';
import { farmsByCode, fixedFactorValues, itemsWithCodes, recordsOfFarms, runWithModelName, seasonsBefore, type ItemRow } from './projection-repository.js';

export const OUTLOOK_PROJECTION_JOB = 'outlook-projection';

export type { ByScenario, CapacityComparison, CoopProjection, FarmOutlook, History, ItemProjection, ProjectionTables, ScenarioName, TotalBand } from '../../shared/outlook-types.js';

/** Everything the projection's numbers depend on; the published version must match it. */
export function draftInputsHash(o: OutlookRow): string {
  const ex = (o.expectations as ItemExpectation[]).map((e) => ({ item: e.item, base: e.base, low: e.low, high: e.high }));
  return hashOf({ modelRunId: o.modelRunId, seasonId: o.seasonId, expectations: ex, scenarioRule: o.scenarioRule, draws: o.draws, seed: o.seed });
}

export async function succeededRun(db: Db, runId: number) {
  const run = await runWithModelName(db, runId);
  if (!run) throw AppError.invalid('The model run does not exist', [{ path: 'body.modelRunId', message: 'No model run has this id' }]);
  if (run.status !== 'succeeded' || !run.result) throw AppError.conflict(`Model run ${runId} has not succeeded (it is ${run.status}); choose a finished run`);
  return { ...run, definition: run.definition as ModelDefinition, result: run.result as FitRunResult };
}

interface ProjectionInputs {
  outlook: OutlookRow;
  season: { label: string; startYear: number };
  fit: FitResult;
  /** The run's forecasting model (null for runs stored before it existed: the profit function alone projects). */
  forecast: ForecastModel | null;
  /** The expectation methods' past relative price errors, one entry per past season (null: too few). */
  priceErrors: { errors: Record<string, number[]>; seasons: string[] } | null;
  itemRows: ItemRow[];
  scenarios: { name: string; prices: Record<string, number> }[];
  farms: { id: number; code: string; name: string; region: string; fixed: Record<string, number>; fixedSource: string }[];
  inputsHash: string;
}

/** Checks the draft can be projected and gathers what the worker needs (farms at their latest land). */
export async function gatherProjectionInputs(db: Db, o: OutlookRow): Promise<ProjectionInputs> {
  if (!o.modelRunId) throw AppError.conflict('Choose a model run for the outlook before projecting');
  const run = await succeededRun(db, o.modelRunId);
  const fit = run.result.fit;
  const season = await seasonById(db, o.seasonId);
  const codes = fit.layout.items.map((i) => i.name);
  const itemRows = await itemsWithCodes(db, codes);
  const expectations = (o.expectations as ItemExpectation[]).filter((e) => codes.includes(e.item));
  const missing = codes.filter((c) => !expectations.some((e) => e.item === c));
  if (missing.length)
    throw AppError.unprocessable(`Set an expected price for every item of the model first; missing: ${missing.join(', ')}`, [
      { path: 'expectations', message: `Missing: ${missing.join(', ')}` },
    ]);
  const roleOf = new Map(fit.layout.items.map((i) => [i.name, i.role]));
  const scenarios = scenarioPrices(
    expectations.map((e) => ({ item: e.item, role: roleOf.get(e.item)!, base: e.base, low: e.low, high: e.high })),
    o.scenarioRule,
  );

  const def = run.definition;
  const farmRows = (await farmsByCode(db)).filter((f) => !def.farms || def.farms.includes(f.code));
  if (!farmRows.length) throw AppError.unprocessable('The model covers no farm that is still on the register');
  const factors = fit.layout.factors.filter((f) => f !== 'trend');
  const landRows = await fixedFactorValues(
    db,
    farmRows.map((f) => f.id),
    factors,
  );
  const farmInputs = farmRows.map((f) => {
    const fixed: Record<string, number> = {};
    const sources: string[] = [];
    for (const factor of factors) {
      const latest = landRows.filter((r) => r.farmId === f.id && r.factor === factor).sort((a, b) => b.startYear - a.startYear)[0];
      if (latest) {
        fixed[factor] = latest.value;
        // Plain words: the screens and the member portal show this text as it is.
        sources.push(`${factor === 'land_ha' ? 'land' : factor.replace(/_/g, ' ')} recorded for ${latest.season}`);
      } else if (factor === 'land_ha') {
        fixed[factor] = f.landHa;
        sources.push('land on the farm register');
      } else throw AppError.unprocessable(`Farm ${f.code} has no value of the fixed factor ${factor}`);
    }
    return { id: f.id, code: f.code, name: f.name, region: f.region, fixed, fixedSource: sources.join(', ') || 'no fixed factors' };
  });
  return {
    outlook: o,
    season: { label: season!.label, startYear: season!.startYear },
    fit,
    forecast: run.result.forecast ?? null,
    priceErrors: priceErrorsOf(expectations),
    itemRows,
    scenarios,
    farms: farmInputs,
    inputsHash: draftInputsHash(o),
  };
}

/** Fewest past seasons of price errors that make a price risk (as for a band from errors). */
export const MIN_PRICE_ERROR_SEASONS = 3;

/**
 * The price risk of the chosen expectation methods: each past season in which every item's method
 * has an error, that season's relative errors (actual − expected) / expected by item, drawn
 * together so that prices that missed together in the past miss together in the draws.
 */
export function priceErrorsOf(expectations: ItemExpectation[]): { errors: Record<string, number[]>; seasons: string[] } | null {
  const withErrors = expectations.filter((e) => e.errors.seasons.length > 0);
  if (!withErrors.length) return null;
  const common = withErrors[0]!.errors.seasons.map((s) => s.season).filter((season) => withErrors.every((e) => e.errors.seasons.some((x) => x.season === season)));
  if (common.length < MIN_PRICE_ERROR_SEASONS) return null;
  const errors = Object.fromEntries(withErrors.map((e) => [e.item, common.map((season) => e.errors.seasons.find((x) => x.season === season)!.errorPct / 100)]));
  return { errors, seasons: common };
}

/** The worker's task: the forecasting model of the run when it has one. */
export function projectionTask(inputs: ProjectionInputs, o: { draws: number; seed: number }): ProjectionTask {
  if (inputs.forecast)
    return {
      kind: 'forecast',
      model: inputs.forecast,
      scenarios: inputs.scenarios,
      farms: inputs.farms.map((f) => ({ farm: f.code, fixed: f.fixed })),
      draws: o.draws,
      seed: o.seed,
      season: inputs.season.startYear,
      priceErrors: inputs.priceErrors?.errors ?? null,
    };
  return {
    kind: 'fit',
    fit: inputs.fit,
    options: { scenarios: inputs.scenarios, farms: inputs.farms.map((f) => ({ id: f.code, fixed: f.fixed })), draws: o.draws, seed: o.seed, season: inputs.season.startYear },
  };
}

const scale = (q: QuantitySummary, f: number): QuantitySummary => ({ point: q.point * f, mean: q.mean * f, sd: q.sd * f, median: q.median * f, p5: q.p5 * f, p95: q.p95 * f });

async function histories(db: Db, farmIds: number[], itemRows: ProjectionInputs['itemRows'], beforeYear: number) {
  const seasonRows = await seasonsBefore(db, beforeYear);
  const recs = await recordsOfFarms(
    db,
    farmIds,
    itemRows.map((i) => i.id),
  );
  const seasonIdx = new Map(seasonRows.map((s, k) => [s.id, k]));
  const empty = (): History => ({ seasons: seasonRows.map((s) => s.label), items: Object.fromEntries(itemRows.map((i) => [i.code, seasonRows.map(() => null)])) });
  const coop = empty();
  const perFarm = new Map(farmIds.map((id) => [id, empty()]));
  const codeOf = new Map(itemRows.map((i) => [i.id, i.code]));
  for (const r of recs) {
    const k = seasonIdx.get(r.seasonId);
    if (k === undefined) continue;
    const code = codeOf.get(r.itemId)!;
    perFarm.get(r.farmId)!.items[code]![k] = r.quantity;
    coop.items[code]![k] = (coop.items[code]![k] ?? 0) + r.quantity;
  }
  return { coop, perFarm };
}

export async function buildTables(db: Db, result: OutlookProjectionResult, inputs: ProjectionInputs): Promise<ProjectionTables> {
  const settings = await getSettings(db);
  const byCode = new Map(inputs.itemRows.map((i) => [i.code, i]));
  const itemProjection = (pick: (sc: OutlookProjectionResult['scenarios'][number]) => Record<string, QuantitySummary>): ItemProjection[] =>
    result.items.map((it) => {
      const row = byCode.get(it.name)!;
      const scenarios = Object.fromEntries(result.scenarios.map((sc) => [sc.name, pick(sc)[it.name]!]));
      const t = tonnesOf(row.unit);
      return {
        item: it.name,
        name: row.name,
        role: it.role,
        unit: row.unit,
        scenarios,
        tonnes: t ? { unit: t.unit, scenarios: Object.fromEntries(Object.entries(scenarios).map(([k, q]) => [k, scale(q, t.factor)])) } : null,
      };
    });
  const coopItems = itemProjection((sc) => sc.coop);
  const delivered = coopItems.filter((i) => i.role === 'output' && isDeliveredInTonnes(i.unit));
  const total = (name: string): TotalBand => {
    const qs = delivered.map((i) => i.scenarios[name]!);
    return { point: sum(qs.map((q) => q.point)), mean: sum(qs.map((q) => q.mean)), p5: sum(qs.map((q) => q.p5)), p95: sum(qs.map((q) => q.p95)) };
  };
  const names = result.scenarios.map((s) => s.name);
  const deliveries = delivered.length
    ? {
        unit: 't' as const,
        items: delivered.map((i) => i.item),
        scenarios: Object.fromEntries(names.map((n) => [n, total(n)])),
        bandNote: 'The band of the total adds up the items’ 5% and 95% points, as if all crops came in high or low together; the true band of the sum is narrower.',
      }
    : null;
  const per = (b: TotalBand, by: number): TotalBand | null => (by > 0 ? { point: b.point / by, mean: b.mean / by, p5: b.p5 / by, p95: b.p95 / by } : null);
  const capacity: CapacityComparison | null = deliveries
    ? {
        storageCapacityT: settings.storageCapacityT,
        handlingCapacityTPerDay: settings.handlingCapacityTPerDay,
        scenarios: Object.fromEntries(
          names.map((n) => [n, { storageShare: per(deliveries.scenarios[n]!, settings.storageCapacityT), handlingDays: per(deliveries.scenarios[n]!, settings.handlingCapacityTPerDay) }]),
        ),
        note:
          settings.storageCapacityT > 0 && settings.handlingCapacityTPerDay > 0
            ? 'Deliveries of all crops over the season against the storage capacity and the daily intake capacity in the settings; grain moved out during the season frees space, which this does not count.'
            : 'Enter the storage and handling capacity in the settings to compare deliveries with them.',
      }
    : null;
  const { coop: coopHistory, perFarm } = await histories(db, inputs.farms.map((f) => f.id), inputs.itemRows, inputs.season.startYear);
  const farmsOut: FarmOutlook[] = inputs.farms.map((f, k) => {
    const pf = (sc: OutlookProjectionResult['scenarios'][number]) => sc.farms[k]!.quantities;
    return {
      farmId: f.id,
      code: f.code,
      name: f.name,
      region: f.region,
      fixed: result.scenarios[0]!.farms[k]!.fixed,
      fixedSource: f.fixedSource,
      items: itemProjection(pf),
      history: perFarm.get(f.id)!,
    };
  });
  const worst = Math.max(...result.scenarios.map((s) => s.curvatureViolationShare));
  const band = {
    spec: result.spec,
    priceRisk: result.priceRisk,
    priceRiskSeasons: result.priceRisk ? (inputs.priceErrors?.seasons.length ?? 0) : 0,
    seasonShockDf: result.seasonShockDf,
  };
  const cc = curvatureCaution(worst);
  return {
    inputsHash: inputs.inputsHash,
    computedAt: new Date().toISOString(),
    season: inputs.season,
    modelRunId: inputs.outlook.modelRunId!,
    draws: result.draws,
    seed: result.seed,
    trendSeason: inputs.fit.layout.trendOrigin !== null ? result.season : null,
    scenarioRule: inputs.outlook.scenarioRule,
    scenarioRuleText: SCENARIO_RULE_TEXT[inputs.outlook.scenarioRule],
    scenarios: result.scenarios.map((s) => ({ name: s.name, prices: s.prices, curvatureViolations: s.curvatureViolations, curvatureViolationShare: s.curvatureViolationShare })),
    coop: { items: coopItems, deliveries, capacity, history: coopHistory },
    farms: farmsOut,
    cautions: cc ? [cc] : [],
    band: { ...band, words: bandCoverWords(band) },
  };
}

function sum(xs: number[]) {
  return xs.reduce((a, b) => a + b, 0);
}

/** The job: project in a worker thread and store the tables on the draft, with progress on the row. */
export function projectionJobHandler(db: Db, pool: WorkerPool): JobHandler {
  return async (job, { signal }) => {
    const id = job.refId!;
    const set = (v: Partial<typeof outlooks.$inferInsert>) => updateOutlook(db, id, v);
    const o = await findOutlook(db, id);
    if (!o) return;
    await set({ projectionStatus: 'running', projectionProgress: 0.05, projectionStage: 'Gathering farms and expected prices', projectionError: null });
    try {
      const inputs = await gatherProjectionInputs(db, o);
      await set({ projectionProgress: 0.15, projectionStage: `Simulating ${o.draws} draws for ${inputs.farms.length} farms and 3 price scenarios` });
      const result = await pool.runProjection(projectionTask(inputs, o), signal);
      await set({ projectionProgress: 0.9, projectionStage: 'Building the tables' });
      const tables = await buildTables(db, result, inputs);
      await set({ projectionStatus: 'succeeded', projectionProgress: 1, projectionStage: 'Done', projection: tables, projectionInputsHash: inputs.inputsHash, projectedAt: new Date() });
    } catch (err) {
      const message = err instanceof AppError ? err.message : `The projection failed: ${(err as Error).message}`;
      await set({ projectionStatus: 'failed', projectionStage: 'Failed', projectionError: message });
    }
  };
}
