/**
 * Budgets: resolve the demand source, copy the products, compute and store. Each save stores the
 * inputs and the result computed from them in one transaction, with an audit entry; reading
 * returns the stored result (in the reader's units), and recomputing the stored inputs gives it again.
 */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getSettings } from '../settings/settings-service.js';
import { getRun } from '../models/models-service.js';
import { isEstimationInputError, type FitResult, type NetputDataset } from '../estimation/index.js';
import type { UnitSystem } from '../../shared/units.js';
import { monthsOutsideInputs, monthWords, seasonLabel, seasonWindows, type SeasonCalendar } from '../../shared/season-calendar.js';
import type { BudgetInput, BudgetSource } from '../../shared/budget-schemas.js';
import { computeBudget, type BudgetResult, type ProductCopy, type ResolvedSource } from './budget-compute.js';
import { inUnits } from './budget-units.js';
import { deleteBudgetRow, findBudgetRow, insertBudget, listBudgetRows, modelName, updateBudgetRow, userName } from './budget-repository.js';
import { activeProducts, productsByIds } from './fertiliser-products-repository.js';
import { demandAt, farmPoints, modelDemand } from './model-demand.js';
import { nutrientItemsOf, priceItemsOf } from './nutrient-items.js';
import { BudgetInputError, NUTRIENTS, type Nutrient } from './nutrients.js';
import { resolveOutlook } from './outlook-source.js';
import { resolveContracted } from './contracted-source.js';

/** Budget errors and engine input errors become a 422 naming the field. */
async function asUnprocessable<T>(f: () => Promise<T> | T): Promise<T> {
  try {
    return await f();
  } catch (err) {
    if (err instanceof BudgetInputError) throw AppError.unprocessable(err.message, err.path ? [{ path: err.path, message: err.message }] : undefined);
    if (isEstimationInputError(err)) throw AppError.unprocessable((err as Error).message);
    throw err;
  }
}

async function resolveModelRun(db: Db, source: Extract<BudgetSource, { kind: 'model-run' }>): Promise<ResolvedSource> {
  const run = (await getRun(db, source.runId, true)) as Awaited<ReturnType<typeof getRun>> & { dataset: NetputDataset };
  if (run.status !== 'succeeded' || !run.result) throw AppError.conflict(`Model run ${source.runId} has not succeeded (it is ${run.status})`);
  const fit = (run.result as { fit: FitResult }).fit;
  const ds = run.dataset;
  const nutrientItems = await nutrientItemsOf(db, fit, source.items);
  const md = modelDemand(fit, ds, { prices: source.prices, season: source.season, items: nutrientItems });
  const name = await modelName(db, run.modelId);
  const points = farmPoints(fit, ds, md.season);
  const priceItems = await priceItemsOf(db, Object.keys(md.prices));
  const nutrientPrices: Partial<Record<Nutrient, number>> = {};
  for (const n of NUTRIENTS) nutrientPrices[n] = md.prices[nutrientItems[n].code]! / nutrientItems[n].kgPerUnit;
  return {
    kind: 'model-run',
    demand: md.demand,
    elasticities: md.elasticities,
    elasticitySource: 'model-run',
    nutrientPrices,
    detail: {
      runId: run.id,
      modelId: run.modelId,
      modelName: name,
      dataHash: run.dataHash,
      runSoftwareVersion: run.softwareVersion,
      season: md.season,
      seasonLabel: md.season === null ? null : seasonLabel(md.season),
      prices: md.prices,
      priceBasis: md.priceBasis,
      priceItems,
      nutrientItems,
      farms: md.farms,
    },
    warnings: md.warnings,
    exactDemandAt: (changes) => {
      const prices = { ...md.prices };
      for (const n of NUTRIENTS) prices[nutrientItems[n].code] = prices[nutrientItems[n].code]! * (1 + (changes[n] ?? 0) / 100);
      return demandAt(fit, points, prices, nutrientItems).total;
    },
  };
}

export async function resolveSource(db: Db, source: BudgetSource): Promise<ResolvedSource> {
  if (source.kind === 'model-run') return resolveModelRun(db, source);
  if (source.kind === 'outlook') return resolveOutlook(db, source);
  if (source.kind === 'contracted') return resolveContracted(db, source);
  const demand = { nitrogen: source.nKg, phosphate: source.p2o5Kg, potash: source.k2oKg };
  return {
    kind: 'manual',
    demand,
    elasticities: source.elasticities ?? null,
    elasticitySource: source.elasticities ? 'given' : 'none',
    nutrientPrices: {},
    detail: {},
    warnings: NUTRIENTS.every((n) => demand[n] === 0) ? ['The nutrient demand is zero; the budget buys nothing'] : [],
  };
}

/** Copies of the chosen (default: every active) product, with the budget's own prices or lots. */
async function copyProducts(db: Db, input: BudgetInput): Promise<ProductCopy[]> {
  const rows = input.products ? await productsByIds(db, input.products.map((p) => p.productId)) : await activeProducts(db);
  if (!input.products && !rows.length) throw new BudgetInputError('The co-op has no active fertiliser products; add some first', 'products');
  const chosen = input.products ?? rows.map((r) => ({ productId: r.id, pricePerT: undefined, lotT: undefined }));
  return chosen.map((c, i) => {
    const row = rows.find((r) => r.id === c.productId);
    if (!row) throw new BudgetInputError(`There is no fertiliser product ${c.productId}`, `products.${i}.productId`);
    return {
      productId: row.id,
      name: row.name,
      nPct: row.nPct,
      p2o5Pct: row.p2o5Pct,
      k2oPct: row.k2oPct,
      form: row.form,
      pricePerT: c.pricePerT ?? row.pricePerT,
      currency: row.currency,
      lotT: c.lotT ?? row.lotT,
      supplier: row.supplier,
      gradeSource: row.gradeSource,
      priceNote: c.pricePerT !== undefined ? 'Budget quote' : row.priceNote,
    };
  });
}

interface StoredInputs {
  source: BudgetSource;
  products: ProductCopy[];
  bookingPlan: BudgetInput['bookingPlan'];
  scenarios: BudgetInput['scenarios'];
  options: BudgetInput['options'];
}

/** A warning when the booking months fall outside the season's input months in the co-op's calendar. */
function calendarWarnings(season: unknown, plan: BudgetInput['bookingPlan'], calendar: SeasonCalendar): string[] {
  if (typeof season !== 'number') return [];
  const outside = monthsOutsideInputs(calendar, season, plan.months.map((m) => m.month));
  if (!outside.length) return [];
  const w = seasonWindows(calendar, season);
  return [
    `Booked in ${outside.map(monthWords).join(', ')}: outside the months the co-op's season calendar gives for buying season ${w.season}'s inputs (${monthWords(w.inputs.from)} – ${monthWords(w.inputs.to)}); check the season or the booking plan`,
  ];
}

async function computeStored(db: Db, inputs: StoredInputs, currency: string): Promise<BudgetResult> {
  const { seasonCalendar } = await getSettings(db);
  return asUnprocessable(async () => {
    const resolved = await resolveSource(db, inputs.source);
    resolved.warnings.push(...calendarWarnings(resolved.detail['season'], inputs.bookingPlan, seasonCalendar));
    return computeBudget(
      {
        currency,
        products: inputs.products,
        bookingPlan: inputs.bookingPlan,
        scenarios: inputs.scenarios,
        lotRule: inputs.options.lotRule,
        referencePrices: inputs.options.referencePrices,
      },
      resolved,
    );
  });
}

async function prepare(db: Db, input: BudgetInput): Promise<{ inputs: StoredInputs; result: BudgetResult }> {
  const products = await asUnprocessable(() => copyProducts(db, input));
  const inputs: StoredInputs = { source: input.source, products, bookingPlan: input.bookingPlan, scenarios: input.scenarios, options: input.options };
  const { currency } = await getSettings(db);
  return { inputs, result: await computeStored(db, inputs, currency) };
}

/** The result of a budget that is not saved (for trying inputs out). */
export async function previewBudget(db: Db, input: BudgetInput, system: UnitSystem) {
  const { inputs, result } = await prepare(db, input);
  return { ...inputs, name: input.name, result: inUnits(result, system) };
}

async function unitSystemOf(db: Db, requested: UnitSystem | undefined): Promise<UnitSystem> {
  return requested ?? (await getSettings(db)).unitSystem;
}
export { unitSystemOf };

async function findRow(db: Db, id: number) {
  const row = await findBudgetRow(db, id);
  if (!row) throw AppError.notFound('The budget');
  return row;
}

function view(row: Awaited<ReturnType<typeof findRow>>, system: UnitSystem, names: { createdByName: string | null; updatedByName: string | null }) {
  return {
    ...row,
    ...names,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    result: inUnits(row.result as BudgetResult, system),
  };
}

export async function getBudget(db: Db, id: number, system: UnitSystem) {
  const row = await findRow(db, id);
  return view(row, system, { createdByName: await userName(db, row.createdBy), updatedByName: await userName(db, row.updatedBy) });
}

/** The stored result in metric, with the header an export needs. */
export async function budgetForExport(db: Db, id: number, system: UnitSystem) {
  const b = await getBudget(db, id, system);
  return { header: { id: b.id, name: b.name, updatedAt: b.updatedAt, updatedBy: b.updatedByName }, result: b.result };
}

export async function listBudgets(db: Db) {
  const rows = await listBudgetRows(db);
  return rows.map((r) => {
    const res = r.result as BudgetResult;
    return {
      id: r.id,
      name: r.name,
      sourceKind: (r.source as BudgetSource).kind,
      currency: res.currency,
      baseCash: res.scenarios[0]?.totals.cash ?? 0,
      baseDemand: res.demand.base,
      scenarioNames: res.scenarios.map((s) => s.name),
      createdAt: r.createdAt.toISOString(),
      updatedAt: r.updatedAt.toISOString(),
    };
  });
}

export async function createBudget(db: Db, input: BudgetInput, actorUserId: number, system: UnitSystem) {
  const { inputs, result } = await prepare(db, input);
  const id = await db.transaction(async (tx) => {
    const newId = await insertBudget(tx, { name: input.name, ...inputs, result, softwareVersion: result.softwareVersion, createdBy: actorUserId, updatedBy: actorUserId });
    await recordAudit(tx, { actorUserId, action: 'budget.create', entity: 'budget', entityId: newId, after: { name: input.name, ...inputs } });
    return newId;
  });
  return getBudget(db, id, system);
}

export async function updateBudget(db: Db, id: number, input: BudgetInput, actorUserId: number, system: UnitSystem) {
  await findRow(db, id);
  const { inputs, result } = await prepare(db, input);
  await db.transaction(async (tx) => {
    const before = await findRow(tx, id);
    await updateBudgetRow(tx, id, { name: input.name, ...inputs, result, softwareVersion: result.softwareVersion, updatedBy: actorUserId, updatedAt: new Date() });
    await recordAudit(tx, {
      actorUserId,
      action: 'budget.update',
      entity: 'budget',
      entityId: id,
      before: { name: before.name, source: before.source, products: before.products, bookingPlan: before.bookingPlan, scenarios: before.scenarios, options: before.options },
      after: { name: input.name, ...inputs },
    });
  });
  return getBudget(db, id, system);
}

export async function deleteBudget(db: Db, id: number, actorUserId: number) {
  await db.transaction(async (tx) => {
    const before = await findRow(tx, id);
    await deleteBudgetRow(tx, id);
    await recordAudit(tx, { actorUserId, action: 'budget.delete', entity: 'budget', entityId: id, before: { name: before.name, source: before.source } });
  });
}

/** Recomputes a stored budget from its stored inputs (same software version → same result). */
export async function recomputeStoredBudget(db: Db, id: number): Promise<{ stored: BudgetResult; recomputed: BudgetResult }> {
  const row = await findRow(db, id);
  const stored = row.result as BudgetResult;
  const recomputed = await computeStored(
    db,
    { source: row.source as BudgetSource, products: row.products as ProductCopy[], bookingPlan: row.bookingPlan as BudgetInput['bookingPlan'], scenarios: row.scenarios as BudgetInput['scenarios'], options: row.options as BudgetInput['options'] },
    stored.currency,
  );
  return { stored, recomputed };
}
