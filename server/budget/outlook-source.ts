/**
 * A budget that starts from a published season outlook (issue 6): the nutrient demand is the
 * outlook's co-op projection (point at θ̂) in the chosen price scenario, as published; the
 * elasticities and the exact re-evaluation for price scenarios come from the outlook's own model
 * run at the same prices and the same farm points (each farm's fixed factors as published).
 *
 * The published snapshot belongs to server/outlook; only the fields read here are checked, so a
 * version without a co-op projection answers 422 rather than a wrong number.
 */
import { z } from 'zod';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { getRun } from '../models/models-service.js';
import { allFarmParts, findVersion } from '../outlook/outlook-repository.js';
import type { FitResult, ForecastModel } from '../estimation/index.js';
import type { BudgetSource } from '../../shared/budget-schemas.js';
import type { ResolvedSource } from './budget-compute.js';
import { coopElasticities, demandAt, forecastDemandAt } from './model-demand.js';
import { nutrientItemsOf, priceItemsOf } from './nutrient-items.js';
import { BudgetInputError, NUTRIENTS, type Nutrient, type NutrientAmounts } from './nutrients.js';

const quantitySchema = z.object({ point: z.number(), p5: z.number(), p95: z.number() });
const snapshotSchema = z.object({
  outlookId: z.number(),
  version: z.number(),
  season: z.object({ label: z.string(), startYear: z.number() }),
  title: z.string(),
  publishedAt: z.string(),
  model: z.object({ runId: z.number(), modelName: z.string().optional() }),
  scenarios: z.array(z.object({ name: z.string(), prices: z.record(z.string(), z.number()) })).min(1),
  projection: z.object({
    trendSeason: z.number().nullable().optional(),
    /** Present when the outlook projected with the run's forecasting model (spec) rather than its profit function alone (null). */
    band: z.object({ spec: z.string().nullable() }).optional(),
    coop: z.object({ items: z.array(z.object({ item: z.string(), unit: z.string(), scenarios: z.record(z.string(), quantitySchema) })) }),
  }),
});
const farmPartSchema = z.object({ code: z.string(), fixed: z.record(z.string(), z.number()) });

export async function resolveOutlook(db: Db, source: Extract<BudgetSource, { kind: 'outlook' }>): Promise<ResolvedSource> {
  const row = await findVersion(db, source.outlookVersionId);
  if (!row) throw AppError.notFound('The published outlook');
  const parsed = snapshotSchema.safeParse(row.snapshot);
  if (!parsed.success) throw new BudgetInputError(`Published outlook ${source.outlookVersionId} carries no co-op projection a budget can read`, 'source.outlookVersionId');
  const snap = parsed.data;
  const scenario = snap.scenarios.find((s) => s.name === source.scenario);
  if (!scenario) throw new BudgetInputError(`The outlook has no "${source.scenario}" scenario (it has ${snap.scenarios.map((s) => s.name).join(', ')})`, 'source.scenario');

  const run = await getRun(db, snap.model.runId);
  const fit = (run.result as { fit: FitResult }).fit;
  const nutrientItems = await nutrientItemsOf(db, fit, source.items);
  const demand = {} as NutrientAmounts;
  const bands = {} as Record<Nutrient, { p5: number; p95: number }>;
  for (const n of NUTRIENTS) {
    const it = snap.projection.coop.items.find((x) => x.item === nutrientItems[n].code);
    const q = it?.scenarios[scenario.name];
    if (!q) throw new BudgetInputError(`The outlook projects no "${nutrientItems[n].code}" (${n}) in its ${scenario.name} scenario`, `source.items.${n}`);
    const k = nutrientItems[n].kgPerUnit;
    demand[n] = q.point * k;
    bands[n] = { p5: q.p5 * k, p95: q.p95 * k };
    if (!(demand[n] > 0)) throw new BudgetInputError(`The outlook projects no positive ${n} demand (${Math.round(demand[n])} kg)`, 'source.outlookVersionId');
  }

  const parts = await allFarmParts(db, row.id);
  const points = parts
    .map((p) => farmPartSchema.safeParse(p))
    .filter((p) => p.success)
    .map((p) => ({ farm: p.data.code, season: snap.season.label, fixed: p.data.fixed }))
    .sort((a, b) => (a.farm < b.farm ? -1 : a.farm > b.farm ? 1 : 0));
  const prices = scenario.prices;
  const priceItems = await priceItemsOf(db, Object.keys(prices));
  const warnings: string[] = [];
  const nutrientPrices: Partial<Record<Nutrient, number>> = {};
  for (const n of NUTRIENTS) if (prices[nutrientItems[n].code] !== undefined) nutrientPrices[n] = prices[nutrientItems[n].code]! / nutrientItems[n].kgPerUnit;
  let elasticities: ResolvedSource['elasticities'] = null;
  let farms: unknown[] = [];
  let exactDemandAt: ResolvedSource['exactDemandAt'];
  if (points.length) {
    elasticities = coopElasticities(fit, points, prices, nutrientItems);
    // The check re-evaluates the model the outlook projected with: the run's forecasting model when the
    // version says so (its farm levels and per-hectare technology), else the profit function.
    const forecast = (run.result as { forecast?: ForecastModel | null }).forecast ?? null;
    const projectedWithForecast = !!forecast && !!snap.projection.band?.spec;
    const check = projectedWithForecast ? forecastDemandAt(forecast!, points, prices, nutrientItems, snap.season.startYear) : demandAt(fit, points, prices, nutrientItems);
    farms = check.farms;
    // Price scenarios move demand by the profit function's response, set on the published level below.
    const base = projectedWithForecast ? demandAt(fit, points, prices, nutrientItems).total : check.total;
    for (const n of NUTRIENTS)
      if (Math.abs(check.total[n] / demand[n] - 1) > 1e-6)
        warnings.push(`The model re-evaluated at the outlook's farms gives ${Math.round(check.total[n])} kg ${n}, the published projection ${Math.round(demand[n])} kg; the budget uses the published figure`);
    const scale = Object.fromEntries(NUTRIENTS.map((n) => [n, demand[n] / base[n]])) as NutrientAmounts;
    exactDemandAt = (changes) => {
      const p = { ...prices };
      for (const n of NUTRIENTS) p[nutrientItems[n].code] = p[nutrientItems[n].code]! * (1 + (changes[n] ?? 0) / 100);
      const t = demandAt(fit, points, p, nutrientItems).total;
      // On the published level: the same ratio to the model's own base figure.
      return { nitrogen: t.nitrogen * scale.nitrogen, phosphate: t.phosphate * scale.phosphate, potash: t.potash * scale.potash };
    };
  } else warnings.push('The published outlook has no farm parts, so the scenarios hold the nutrient demand fixed');

  // Every scenario of the outlook, with its published demand and its nutrient prices per kg.
  const outlookScenarios = snap.scenarios.map((sc) => {
    const d = {} as NutrientAmounts;
    const np: Partial<Record<Nutrient, number>> = {};
    for (const n of NUTRIENTS) {
      const q = snap.projection.coop.items.find((x) => x.item === nutrientItems[n].code)?.scenarios[sc.name];
      d[n] = (q?.point ?? demand[n] / nutrientItems[n].kgPerUnit) * nutrientItems[n].kgPerUnit;
      if (sc.prices[nutrientItems[n].code] !== undefined) np[n] = sc.prices[nutrientItems[n].code]! / nutrientItems[n].kgPerUnit;
    }
    return { name: sc.name, demand: d, nutrientPrices: np };
  });

  return {
    kind: 'outlook',
    demand,
    outlookScenarios,
    // Budgets stored before these options existed bought at list prices with one scenario.
    pricing: source.pricing === 'outlook' ? 'source' : 'list',
    sideBySide: source.sideBySide ?? false,
    elasticities,
    elasticitySource: elasticities ? 'outlook' : 'none',
    nutrientPrices,
    detail: {
      outlookId: snap.outlookId,
      versionId: row.id,
      version: snap.version,
      title: snap.title,
      season: snap.season.startYear,
      seasonLabel: snap.season.label,
      publishedAt: snap.publishedAt,
      scenario: scenario.name,
      runId: snap.model.runId,
      modelName: snap.model.modelName ?? null,
      prices,
      priceItems,
      bands,
      nutrientItems,
      farms,
    },
    warnings,
    exactDemandAt,
  };
}
