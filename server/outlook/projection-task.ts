import {
  projectForecast,
  projectSeason,
  type FitResult,
  type ForecastFarm,
  type ForecastModel,
  type ProjectionOptions,
  type ProjectionResult,
} from '../estimation/index.js';
import { lowerWorkerPriority } from '../jobs/worker-priority.js';

lowerWorkerPriority();

/**
 * What the projection worker is given: plain JSON, so it crosses the thread boundary unchanged.
 * 'forecast': the run's forecasting model (per hectare with farm and season effects, or pooled),
 * one projection per price scenario with the expectation method's past price errors as price risk.
 * 'fit': runs stored before forecasting models existed, projected with the profit function alone.
 */
export type ProjectionTask =
  | {
      kind: 'forecast';
      model: ForecastModel;
      scenarios: { name: string; prices: Record<string, number> }[];
      farms: ForecastFarm[];
      draws: number;
      seed: number;
      season: number;
      /** Past relative errors of the expectation methods by item, one entry per past season (null: no price risk). */
      priceErrors: Record<string, number[]> | null;
    }
  | { kind: 'fit'; fit: FitResult; options: ProjectionOptions };

/** The outlook's projection: the engine's scenarios, plus what the band covers. */
export interface OutlookProjectionResult extends ProjectionResult {
  /** 'per-hectare' | 'pooled' for a forecasting model; null for a profit function alone. */
  spec: ForecastModel['spec'] | null;
  /** The draws include the expectation method's past price errors. */
  priceRisk: boolean;
  /** Degrees of freedom of the season shock's t predictive (null: no season shock in the model). */
  seasonShockDf: number | null;
}

/** Worker entry (piscina, via WorkerPool.runProjection). */
export default function projectionWorker(task: ProjectionTask): OutlookProjectionResult {
  if (task.kind === 'fit') return { ...projectSeason(task.fit, task.options), spec: null, priceRisk: false, seasonShockDf: null };
  const runs = task.scenarios.map((sc) => ({
    sc,
    p: projectForecast(task.model, {
      farms: task.farms,
      prices: sc.prices,
      season: task.season,
      draws: task.draws,
      seed: task.seed,
      level: 0.9,
      ...(task.priceErrors ? { priceErrors: task.priceErrors } : {}),
    }),
  }));
  const first = runs[0]!.p;
  // The farms' fixed factors as projected, with the trend of the season as the profit function counts it.
  const origin = task.model.fit.layout.trendOrigin;
  const fixedOf = (k: number) => ({ ...task.farms[k]!.fixed, ...(origin !== null ? { trend: task.season - origin + 1 } : {}) });
  return {
    draws: first.draws,
    seed: first.seed,
    season: first.season,
    items: first.items,
    scenarios: runs.map(({ sc, p }) => ({
      name: sc.name,
      prices: sc.prices,
      farms: p.farms.map((f, k) => ({ id: f.farm, fixed: fixedOf(k), quantities: f.quantities })),
      coop: p.coop,
      curvatureViolations: Math.round(p.curvatureViolationShare * p.draws),
      curvatureViolationShare: p.curvatureViolationShare,
    })),
    caution: first.caution,
    spec: task.model.spec,
    priceRisk: first.priceRisk,
    seasonShockDf: first.seasonShockDf,
  };
}
