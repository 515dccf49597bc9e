/**
 * A budget based on contracted output (issue 19): the nutrient demand is the outlook's contracted
 * evaluation on the contract basis — farms with signed contracts at their committed output
 * (conditional demand, cost-minimising; Shephard's lemma), every other farm as the outlook projects it
 * in its base scenario — the `contracted` column of the evaluation's demand basis
 * (server/contracts/contracted-service.ts), so the budget and the comparison show the same figure.
 *
 * The figures are those of one finished evaluation (the latest, or the one named); the budget stores
 * its result when saved, so a later evaluation changes it only when it is saved again.
 *
 * Price scenarios (docs/cost-duality.md §4.1): output is held at the contracted tonnage, so on the
 * contracting farms only the input mix responds — by the conditional (cost-side, Shephard) own- and
 * cross-price elasticities the engine computed for each of them in the evaluation — while every other
 * farm responds as on the outlook basis (the run's profit function at the outlook's farm points and
 * base prices, Hotelling). The budget's elasticities are those of the sum (elasticitiesOfSum); the
 * exact figure beside each scenario asks the engine again: the contracting farms' conditional demand
 * at the changed prices (evaluateContracted, point only) and the others' demand from the profit
 * function, each on its base level.
 */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { getRun } from '../models/models-service.js';
import { finishedView, viewIsStale } from '../contracts/contracted-service.js';
import { findOutlook } from '../outlook/outlook-repository.js';
import { evaluateContracted, type ContractedFarmResult, type FitResult, type ForecastModel } from '../estimation/index.js';
import type { BudgetSource } from '../../shared/budget-schemas.js';
import type { ContractedView } from '../../shared/contracted-view.js';
import type { ProjectionTables } from '../../shared/outlook-types.js';
import type { ResolvedSource } from './budget-compute.js';
import { coopElasticities, demandAt, type NutrientItem } from './model-demand.js';
import { nutrientItemsOf } from './nutrient-items.js';
import { BudgetInputError, NUTRIENTS, zeroAmounts, type Nutrient, type NutrientAmounts } from './nutrients.js';
import { elasticitiesOfSum, type DemandPart, type ElasticityMatrix, type PriceChanges } from './scenarios.js';

type Items = Record<Nutrient, NutrientItem>;

/** A contracting farm's conditional demand (kg) and its conditional elasticities among the nutrients, from the engine's evaluation. */
export function conditionalPart(farm: ContractedFarmResult, items: Items): DemandPart | null {
  const table = farm.elasticities?.conditional;
  if (!farm.evaluated || !table) return null;
  const demand = zeroAmounts();
  const elasticities = {} as ElasticityMatrix;
  for (const i of NUTRIENTS) {
    demand[i] = (farm.inputs[items[i].code]?.point ?? 0) * items[i].kgPerUnit;
    const r = table.rows.indexOf(items[i].code);
    elasticities[i] = {} as Record<Nutrient, number>;
    for (const j of NUTRIENTS) {
      const c = table.columns.indexOf(items[j].code);
      elasticities[i][j] = r >= 0 && c >= 0 ? table.values[r]![c]! : 0;
    }
  }
  return { demand, elasticities };
}

const withoutTrend = (f: Record<string, number>) => Object.fromEntries(Object.entries(f).filter(([k]) => k !== 'trend'));
const scaled = (a: NutrientAmounts, num: NutrientAmounts, den: NutrientAmounts): NutrientAmounts =>
  Object.fromEntries(NUTRIENTS.map((n) => [n, den[n] > 0 ? (a[n] * num[n]) / den[n] : a[n]])) as NutrientAmounts;

/**
 * How the contract basis responds to nutrient price changes: its elasticities and the exact
 * re-evaluation, or null (with the reason) when the outlook's projection the basis was built on is gone.
 */
function contractBasisResponse(
  view: ContractedView,
  projection: ProjectionTables | null,
  fit: FitResult,
  forecast: ForecastModel | null,
  items: Items,
  demand: NutrientAmounts,
): { elasticities: ElasticityMatrix; exactDemandAt?: (changes: PriceChanges) => NutrientAmounts } | string {
  if (!projection) return 'The outlook has no up-to-date projection, so the price scenarios hold the contract-based demand fixed: project the outlook and evaluate its contracts again';
  const prices = (projection.scenarios.find((s) => s.name === 'base') ?? projection.scenarios[0])?.prices;
  if (!prices) return 'The outlook’s projection has no price scenario, so the price scenarios hold the contract-based demand fixed';
  const evaluated = new Map(view.evaluation.farms.filter((f) => f.evaluated).map((f) => [f.farm, f]));
  const held = projection.farms.filter((f) => evaluated.has(f.code));
  const free = projection.farms.filter((f) => !evaluated.has(f.code)).map((f) => ({ farm: f.code, fixed: f.fixed }));
  const parts: DemandPart[] = [];
  for (const f of held) {
    const part = conditionalPart(evaluated.get(f.code)!, items);
    if (!part) return `The contract evaluation has no conditional elasticities for farm ${f.code}: evaluate the contracts again`;
    parts.push(part);
  }
  const heldDemand = zeroAmounts();
  for (const p of parts) for (const n of NUTRIENTS) heldDemand[n] += p.demand[n];
  // The other farms as the outlook projects them: the rest of the contract basis.
  const freeDemand = Object.fromEntries(NUTRIENTS.map((n) => [n, Math.max(0, demand[n] - heldDemand[n])])) as NutrientAmounts;
  if (free.length) parts.push({ demand: freeDemand, elasticities: coopElasticities(fit, free, prices, items) });
  const elasticities = elasticitiesOfSum(parts);
  if (!forecast) return { elasticities };

  const at = (changes: PriceChanges) => {
    const p = { ...prices };
    for (const n of NUTRIENTS) p[items[n].code] = p[items[n].code]! * (1 + (changes[n] ?? 0) / 100);
    return p;
  };
  const specs = held.map((f) => ({
    farm: f.code,
    fixed: withoutTrend(f.fixed),
    contracted: Object.fromEntries(Object.entries(evaluated.get(f.code)!.outputs).map(([item, o]) => [item, o.quantity])),
  }));
  /** The contracting farms' conditional demand (kg) by the engine at a price point; a farm it cannot evaluate there keeps its base figure. */
  const conditionalAt = (p: Record<string, number>, fallback: NutrientAmounts[]): NutrientAmounts => {
    const total = zeroAmounts();
    if (!specs.length) return total;
    const ev = evaluateContracted(forecast, { farms: specs, prices: p, season: view.evaluation.season, draws: 0 });
    ev.farms.forEach((f, k) => {
      for (const n of NUTRIENTS) total[n] += f.evaluated ? (f.inputs[items[n].code]?.point ?? 0) * items[n].kgPerUnit : fallback[k]![n];
    });
    return total;
  };
  const heldParts = parts.slice(0, held.length).map((p) => p.demand);
  // The engine's own base figures, computed when a scenario first asks.
  let base: { held: NutrientAmounts; free: NutrientAmounts } | undefined;
  return {
    elasticities,
    exactDemandAt: (changes) => {
      base ??= { held: conditionalAt(prices, heldParts), free: free.length ? demandAt(fit, free, prices, items).total : zeroAmounts() };
      const { held: heldBase, free: freeBase } = base;
      const p = at(changes);
      // Each part on its own base level: the same ratio to the engine's own base figure.
      const c = scaled(heldDemand, conditionalAt(p, heldParts), heldBase);
      const u = free.length ? scaled(freeDemand, demandAt(fit, free, p, items).total, freeBase) : zeroAmounts();
      return Object.fromEntries(NUTRIENTS.map((n) => [n, c[n] + u[n]])) as NutrientAmounts;
    },
  };
}

export async function resolveContracted(db: Db, source: Extract<BudgetSource, { kind: 'contracted' }>): Promise<ResolvedSource> {
  const found = await finishedView(db, source.outlookId, source.evaluationId);
  if (!found)
    throw new BudgetInputError(
      source.evaluationId !== undefined
        ? `Outlook ${source.outlookId} has no finished contract evaluation ${source.evaluationId}`
        : `Outlook ${source.outlookId} has no finished contract evaluation: evaluate its contracts first (Outlook → Contracted output)`,
      'source.outlookId',
    );
  const { jobId, view } = found;
  if (!view.demandBasis)
    throw new BudgetInputError('The contract evaluation has no outlook projection to complete the uncontracted farms: project the outlook, then evaluate its contracts again', 'source.outlookId');
  const run = await getRun(db, view.modelRunId);
  if (run.status !== 'succeeded' || !run.result) throw AppError.conflict(`Model run ${view.modelRunId} has not succeeded (it is ${run.status})`);
  const fit = (run.result as { fit: FitResult }).fit;
  const nutrientItems = await nutrientItemsOf(db, fit, source.items);

  const demand = {} as NutrientAmounts;
  const outlookDemand = {} as NutrientAmounts;
  const bands = {} as Record<Nutrient, { p5: number; p95: number }>;
  const nutrientPrices: Partial<Record<Nutrient, number>> = {};
  for (const n of NUTRIENTS) {
    const { code, kgPerUnit } = nutrientItems[n];
    const row = view.demandBasis.rows.find((r) => r.item === code);
    if (!row) throw new BudgetInputError(`The contract evaluation has no "${code}" (${n}) demand`, `source.items.${n}`);
    demand[n] = row.contracted.point * kgPerUnit;
    outlookDemand[n] = row.outlook.point * kgPerUnit;
    bands[n] = { p5: row.contracted.p5 * kgPerUnit, p95: row.contracted.p95 * kgPerUnit };
    if (!(demand[n] > 0)) throw new BudgetInputError(`The contract basis gives no positive ${n} demand (${Math.round(demand[n])} kg)`, 'source.outlookId');
    const price = view.evaluation.prices?.[code];
    if (price !== undefined) nutrientPrices[n] = price / kgPerUnit;
  }

  const warnings: string[] = [];
  const o = await findOutlook(db, view.outlookId);
  const projection = o?.projectionStatus === 'succeeded' ? ((o.projection as ProjectionTables | null) ?? null) : null;
  const forecast = (run.result as { forecast?: ForecastModel | null }).forecast ?? null;
  const response = contractBasisResponse(view, projection, fit, forecast, nutrientItems, demand);
  if (typeof response === 'string') warnings.push(response);
  if (await viewIsStale(db, view)) warnings.push('The outlook or its contracts changed after this contract evaluation: evaluate the contracts again and save the budget to use the new figures');
  const leftOut = view.evaluation.coop.farmsLeftOut;
  if (leftOut.length) warnings.push(`Contracts of ${leftOut.join(', ')} could not be evaluated; those farms count as the outlook projects them`);

  return {
    kind: 'contracted',
    demand,
    elasticities: typeof response === 'string' ? null : response.elasticities,
    elasticitySource: typeof response === 'string' ? 'none' : 'contracts',
    exactDemandAt: typeof response === 'string' ? undefined : response.exactDemandAt,
    nutrientPrices,
    detail: {
      outlookId: view.outlookId,
      evaluationId: jobId,
      computedAt: view.computedAt,
      seasonLabel: view.season,
      runId: view.modelRunId,
      contracts: view.contracts.length,
      contractingFarms: view.evaluation.coop.farmsEvaluated,
      farmsLeftOut: leftOut,
      bands,
      outlookDemand,
      nutrientItems,
      note: view.demandBasis.note,
    },
    warnings,
  };
}
