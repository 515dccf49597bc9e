/**
 * A budget based on contracted output (issue 19): the nutrient demand is the outlook's contracted
 * evaluation on the contract basis — farms with signed contracts at their committed output
 * (conditional demand, cost-minimising; Shephard's lemma), every other farm as the outlook projects it
 * in its base scenario — the `contracted` column of the evaluation's demand basis
 * (server/contracts/contracted-service.ts), so the budget and the comparison show the same figure.
 *
 * The figures are those of one finished evaluation (the latest, or the one named); the budget stores
 * its result when saved, so a later evaluation changes it only when it is saved again. Scenarios hold
 * the demand fixed: the co-op's conditional elasticities cover only the contracting farms.
 */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { getRun } from '../models/models-service.js';
import { finishedView, viewIsStale } from '../contracts/contracted-service.js';
import type { FitResult } from '../estimation/index.js';
import type { BudgetSource } from '../../shared/budget-schemas.js';
import type { ResolvedSource } from './budget-compute.js';
import { nutrientItemsOf } from './nutrient-items.js';
import { BudgetInputError, NUTRIENTS, type Nutrient, type NutrientAmounts } from './nutrients.js';

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
  if (await viewIsStale(db, view)) warnings.push('The outlook or its contracts changed after this contract evaluation: evaluate the contracts again and save the budget to use the new figures');
  const leftOut = view.evaluation.coop.farmsLeftOut;
  if (leftOut.length) warnings.push(`Contracts of ${leftOut.join(', ')} could not be evaluated; those farms count as the outlook projects them`);
  warnings.push('Price scenarios hold the contract-based demand fixed (the committed output does not move with fertiliser prices in this budget)');

  return {
    kind: 'contracted',
    demand,
    elasticities: null,
    elasticitySource: 'none',
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
