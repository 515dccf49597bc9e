/**
 * The co-op's nitrogen, phosphate and potash demand from a fitted model run: Hotelling's lemma
 * evaluated per farm at the farm's latest fixed factors in the run's data snapshot and at the
 * expected prices, summed over farms (the same point projection projectSeason reports as `point`).
 * Cheap (one evaluation and one price Hessian per farm), so it runs on the request thread.
 *
 * Co-op elasticities are those of the summed demand: e_ij = Σ_f ∂y_fi/∂p_j · p_j / Σ_f y_fi.
 */
import { evaluateFit, priceHessianAt, projectForecast, type FitResult, type ForecastModel, type NetputDataset } from '../estimation/index.js';
import { BudgetInputError, NUTRIENTS, zeroAmounts, type Nutrient, type NutrientAmounts } from './nutrients.js';
import type { ElasticityMatrix } from './scenarios.js';

/** How a model item measures a nutrient: kg of nutrient per unit of the item's quantity. */
export interface NutrientItem {
  code: string;
  kgPerUnit: number;
}

export interface FarmPoint {
  farm: string;
  /** The latest season of the farm in the snapshot. */
  season: string;
  fixed: Record<string, number>;
}

export interface FarmDemand extends FarmPoint {
  demand: NutrientAmounts;
}

export interface ModelDemand {
  demand: NutrientAmounts;
  elasticities: ElasticityMatrix;
  /** The full price point used, by item code. */
  prices: Record<string, number>;
  /** For each item, whether its price was given or taken from the last season (naive expectation). */
  priceBasis: Record<string, 'given' | 'last season'>;
  season: number | null;
  farms: FarmDemand[];
  warnings: string[];
}

/** Each farm's latest observation in the snapshot (or each observation of the last season when farms are not named). */
export function farmPoints(fit: FitResult, ds: NetputDataset, season: number | null): FarmPoint[] {
  const latest = new Map<string, number>();
  const lastYear = Math.max(...ds.seasonYears);
  ds.seasons.forEach((_, i) => {
    const key = ds.farms?.[i] ?? (ds.seasonYears[i] === lastYear ? `row ${ds.rows[i] ?? i + 1}` : null);
    if (key === null) return;
    const prev = latest.get(key);
    if (prev === undefined || ds.seasonYears[i]! >= ds.seasonYears[prev]!) latest.set(key, i);
  });
  const trendOrigin = fit.layout.trendOrigin;
  return [...latest.entries()]
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    .map(([farm, i]) => {
      const fixed: Record<string, number> = {};
      ds.fixedFactors.forEach((f, k) => (fixed[f] = ds.fixed[k]![i]!));
      if (trendOrigin !== null && season !== null) fixed.trend = season - trendOrigin + 1;
      return { farm, season: ds.seasons[i]!, fixed };
    });
}

/** Expected prices: those given, the rest at the mean of the snapshot's last season (naive expectation). */
export function expectedPrices(fit: FitResult, ds: NetputDataset, given: Record<string, number>): { prices: Record<string, number>; basis: Record<string, 'given' | 'last season'> } {
  const codes = fit.layout.items.map((i) => i.name);
  for (const [code, v] of Object.entries(given)) {
    if (!codes.includes(code)) throw new BudgetInputError(`"${code}" is not an item of the model run (items: ${codes.join(', ')})`, `source.prices.${code}`);
    if (!(Number.isFinite(v) && v > 0)) throw new BudgetInputError(`The expected price of ${code} must be above 0, got ${v}`, `source.prices.${code}`);
  }
  const lastYear = Math.max(...ds.seasonYears);
  const prices: Record<string, number> = {};
  const basis: Record<string, 'given' | 'last season'> = {};
  for (const code of codes) {
    if (given[code] !== undefined) {
      prices[code] = given[code]!;
      basis[code] = 'given';
      continue;
    }
    const col = ds.items.findIndex((it) => it.name === code);
    const xs = ds.prices[col]!.filter((_, i) => ds.seasonYears[i] === lastYear);
    prices[code] = xs.reduce((a, b) => a + b, 0) / xs.length;
    basis[code] = 'last season';
  }
  return { prices, basis };
}

function nutrientIndex(fit: FitResult, items: Record<Nutrient, NutrientItem>): Record<Nutrient, number> {
  const idx = {} as Record<Nutrient, number>;
  for (const n of NUTRIENTS) {
    const i = fit.layout.items.findIndex((it) => it.name === items[n].code);
    if (i < 0 || fit.layout.items[i]!.role !== 'input') throw new BudgetInputError(`The model run has no input item "${items[n].code}" for ${n}`, 'source.runId');
    idx[n] = i;
  }
  return idx;
}

/** Co-op nutrient demand (kg) at a price point, summed over the farm points. */
export function demandAt<P extends Pick<FarmPoint, 'fixed'>>(fit: FitResult, points: P[], prices: Record<string, number>, items: Record<Nutrient, NutrientItem>): { total: NutrientAmounts; farms: (P & { demand: NutrientAmounts })[] } {
  const idx = nutrientIndex(fit, items);
  const total = zeroAmounts();
  const farms = points.map((pt) => {
    const ev = evaluateFit(fit, { prices, fixed: pt.fixed });
    const demand = zeroAmounts();
    for (const n of NUTRIENTS) {
      demand[n] = -ev.netputs[idx[n]]! * items[n].kgPerUnit;
      total[n] += demand[n];
    }
    return { ...pt, demand };
  });
  return { total, farms };
}

/**
 * Co-op nutrient demand (kg) from a run's forecasting model (per hectare with each farm's own level,
 * or pooled), at its point (θ̂, no shocks): the figures an outlook projected with that model publishes.
 */
export function forecastDemandAt<P extends Pick<FarmPoint, 'farm' | 'fixed'>>(
  model: ForecastModel,
  points: P[],
  prices: Record<string, number>,
  items: Record<Nutrient, NutrientItem>,
  season: number,
): { total: NutrientAmounts; farms: (P & { demand: NutrientAmounts })[] } {
  const withoutTrend = (f: Record<string, number>) => Object.fromEntries(Object.entries(f).filter(([k]) => k !== 'trend'));
  // The point needs no draws; the engine's smallest simulation keeps this cheap.
  const proj = projectForecast(model, { farms: points.map((p) => ({ farm: p.farm, fixed: withoutTrend(p.fixed) })), prices, season, draws: 100, seed: 1 });
  const total = zeroAmounts();
  const farms = points.map((pt, k) => {
    const demand = zeroAmounts();
    for (const n of NUTRIENTS) {
      demand[n] = (proj.farms[k]!.quantities[items[n].code]?.point ?? 0) * items[n].kgPerUnit;
      total[n] += demand[n];
    }
    return { ...pt, demand };
  });
  return { total, farms };
}

/** Demand, co-op elasticities and the point used, for a model run at expected prices. */
export function modelDemand(
  fit: FitResult,
  ds: NetputDataset,
  options: { prices: Record<string, number>; season?: number; items: Record<Nutrient, NutrientItem> },
): ModelDemand {
  const season = fit.layout.trendOrigin !== null ? (options.season ?? fit.seasonYears.last + 1) : (options.season ?? null);
  const { prices, basis } = expectedPrices(fit, ds, options.prices);
  const points = farmPoints(fit, ds, season);
  if (!points.length) throw new BudgetInputError('The model run has no farm observations to project from', 'source.runId');
  const { total, farms } = demandAt(fit, points, prices, options.items);
  const warnings: string[] = [];
  for (const n of NUTRIENTS) {
    const negative = farms.filter((f) => f.demand[n] < 0).map((f) => f.farm);
    if (negative.length) warnings.push(`The fitted ${n} demand is negative for ${negative.join(', ')} (the model's sign is violated there); the co-op total includes these values as fitted`);
    if (!(total[n] > 0)) throw new BudgetInputError(`The model run projects no positive ${n} demand at these prices (${Math.round(total[n])} kg); check the expected prices or enter the demand by hand`, 'source');
  }
  const elasticities = coopElasticities(fit, points, prices, options.items);
  return { demand: total, elasticities, prices, priceBasis: basis, season, farms, warnings };
}

/** Elasticities of the co-op's summed demand: e_ij = Σ_f ∂y_fi/∂p_j · p_j / Σ_f y_fi over the farm points. */
export function coopElasticities(fit: FitResult, points: Pick<FarmPoint, 'fixed'>[], prices: Record<string, number>, items: Record<Nutrient, NutrientItem>): ElasticityMatrix {
  const idx = nutrientIndex(fit, items);
  const order = fit.layout.items.map((it) => it.name);
  const p = order.map((c) => prices[c]!);
  const sumH = order.map(() => order.map(() => 0));
  const sumY = order.map(() => 0);
  for (const pt of points) {
    const H = priceHessianAt(fit, { prices, fixed: pt.fixed });
    const y = evaluateFit(fit, { prices, fixed: pt.fixed }).netputs;
    H.forEach((row, i) => row.forEach((h, j) => (sumH[i]![j]! += h)));
    y.forEach((v, i) => (sumY[i]! += v));
  }
  const elasticities = {} as ElasticityMatrix;
  for (const i of NUTRIENTS) {
    elasticities[i] = {} as Record<Nutrient, number>;
    for (const j of NUTRIENTS) elasticities[i][j] = (sumH[idx[i]]![idx[j]]! * p[idx[j]]!) / sumY[idx[i]]!;
  }
  return elasticities;
}
