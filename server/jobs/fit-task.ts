import type { MessagePort } from 'node:worker_threads';
import {
  backTestForecast,
  elasticitiesAt,
  fitForecastModel,
  evaluateFit,
  fitProfitFunction,
  fitToContractJson,
  longRunResponse,
  shadowValues,
  type FitOptions,
  type FitResult,
  type BackTestResult,
  type ForecastModel,
  type ForecastSpec,
  type NetputDataset,
} from '../estimation/index.js';
import type { BacktestSeason, FitRunResult } from '../../shared/estimation-types.js';
import { lowerWorkerPriority } from './worker-priority.js';

lowerWorkerPriority();

/** What the fit worker is given: plain JSON, so it crosses the thread boundary unchanged. */
export interface FitTask {
  dataset: NetputDataset;
  options: FitOptions;
  /** The forecasting model's specification (the outlook projects with it; the back-test tests it). */
  spec: ForecastSpec;
  backtestSeasons: number;
  progressPort?: MessagePort;
}

export type { BacktestItem, BacktestSeason, FitRunResult } from '../../shared/estimation-types.js';

type Progress = (share: number, stage: string) => void;

function pointOf(ds: NetputDataset, fit: FitResult, obs: number) {
  const prices: Record<string, number> = {};
  ds.items.forEach((it, i) => (prices[it.name] = ds.prices[i][obs]));
  const fixed: Record<string, number> = {};
  ds.fixedFactors.forEach((f, k) => (fixed[f] = ds.fixed[k][obs]));
  if (fit.layout.trendOrigin !== null) fixed.trend = ds.seasonYears[obs] - fit.layout.trendOrigin + 1;
  return { prices, fixed };
}

/** Fitted quantities (≥ 0 for the expected sign) of every item at observation `obs`. */
function fittedAt(ds: NetputDataset, fit: FitResult, obs: number): Record<string, number> {
  const ev = evaluateFit(fit, pointOf(ds, fit, obs));
  const out: Record<string, number> = {};
  fit.layout.items.forEach((it, i) => (out[it.name] = it.role === 'output' ? ev.netputs[i] : -ev.netputs[i]));
  return out;
}

function seasonTotals(ds: NetputDataset, season: string, values: (obs: number) => Record<string, number>) {
  const total: Record<string, number> = {};
  ds.seasons.forEach((s, obs) => {
    if (s !== season) return;
    for (const [k, v] of Object.entries(values(obs))) total[k] = (total[k] ?? 0) + v;
  });
  return total;
}

function actualAt(ds: NetputDataset, obs: number) {
  const out: Record<string, number> = {};
  ds.items.forEach((it, i) => (out[it.name] = ds.quantities[i][obs]));
  return out;
}

/**
 * Rolling origin (docs/forecasting.md §7): the engine refits the forecasting model on the seasons
 * before each of the last k seasons, projects that season at the prices actually seen and sets it
 * against what happened, per farm against the two plain rules and for the co-op total, with the
 * coverage of the 90 % bands. The co-op rows also make the season-by-season table of the page.
 */
export function backtest(ds: NetputDataset, options: FitOptions, spec: ForecastSpec, k: number, progress: Progress): { skill: BackTestResult | null; table: FitRunResult['backtest'] } {
  progress(0.3, `Back-testing the last ${k} seasons`);
  let skill: BackTestResult;
  try {
    skill = backTestForecast(ds, {
      ...options,
      spec,
      maxOrigins: k,
      level: 0.9,
      onProgress: (share, stage) => progress(0.3 + 0.6 * share, stage),
    });
  } catch (err) {
    return { skill: null, table: { seasons: [], items: [], error: `The back-test could not be run: ${(err as Error).message}` } };
  }
  const years = new Map(ds.seasons.map((s, i) => [s, ds.seasonYears[i]!]));
  const first = ds.seasons[ds.seasonYears.indexOf(Math.min(...ds.seasonYears))]!;
  const good = skill.origins.filter((o) => !o.error);
  const seasons: BacktestSeason[] = good.map((o) => ({
    season: o.season,
    predicted: Object.fromEntries(Object.entries(o.coop).map(([k, v]) => [k, v.point])),
    actual: Object.fromEntries(Object.entries(o.coop).map(([k, v]) => [k, v.actual])),
    fittedOn: { first, last: o.fittedThrough, observations: ds.seasonYears.filter((y) => y <= (years.get(o.fittedThrough) ?? -Infinity)).length },
  }));
  const items = ds.items.map((it) => {
    const pct = seasons.filter((s) => s.actual[it.name]! > 0).map((s) => (s.predicted[it.name]! - s.actual[it.name]!) / s.actual[it.name]!);
    return {
      item: it.name,
      mape: pct.length ? (100 * pct.reduce((a, b) => a + Math.abs(b), 0)) / pct.length : NaN,
      bias: pct.length ? (100 * pct.reduce((a, b) => a + b, 0)) / pct.length : NaN,
    };
  });
  const failed = skill.origins.find((o) => o.error);
  return { skill, table: { seasons, items, error: failed ? `Back-test of ${failed.season} could not be fitted: ${failed.error}` : null } };
}

export function runFit(task: Omit<FitTask, 'progressPort'>, progress: Progress = () => {}): FitRunResult {
  const { dataset: ds, options } = task;
  progress(0.05, 'Fitting the netput system');
  const fit = fitProfitFunction(ds, options);
  progress(0.2, 'Elasticities and diagnostics');
  const summary = fitToContractJson(fit);
  const elasticities = elasticitiesAt(fit);
  const shadow = shadowValues(fit);
  let longRun: FitRunResult['longRun'] = null;
  let longRunError: string | null = null;
  if (ds.fixedFactors.length) {
    try {
      longRun = longRunResponse(fit);
    } catch (err) {
      longRunError = (err as Error).message;
    }
  }
  const residuals: FitRunResult['residuals'] = [];
  const fittedObs: Record<string, number>[] = [];
  ds.seasons.forEach((season, obs) => {
    const fitted = fittedAt(ds, fit, obs);
    fittedObs.push(fitted);
    const actual = actualAt(ds, obs);
    const residual: Record<string, number> = {};
    for (const k of Object.keys(fitted)) residual[k] = actual[k] - fitted[k];
    residuals.push({ season, farm: ds.farms?.[obs] ?? null, fitted, residual });
  });
  const seasonLabels = [...new Set(ds.seasons)];
  const fittedBySeason = seasonLabels.map((season) => ({
    season,
    actual: seasonTotals(ds, season, (obs) => actualAt(ds, obs)),
    fitted: seasonTotals(ds, season, (obs) => fittedObs[obs]),
  }));
  const responseCurves = fit.layout.items.map((it, i) => {
    const mean = fit.means.prices[i];
    const prices = Array.from({ length: 21 }, (_, k) => mean * (0.5 + k * 0.05));
    const quantities = prices.map((p) => {
      const ev = evaluateFit(fit, { prices: { [it.name]: p } });
      return it.role === 'output' ? ev.netputs[i] : -ev.netputs[i];
    });
    return { item: it.name, prices, quantities };
  });
  progress(0.25, task.spec === 'per-hectare' ? 'Fitting the per-hectare model with farm and season effects' : 'Fitting the forecasting model');
  let forecast: ForecastModel | null = null;
  let forecastError: string | null = null;
  try {
    forecast = fitForecastModel(ds, { ...options, spec: task.spec });
  } catch (err) {
    forecastError = (err as Error).message;
  }
  let forecastElasticities: FitRunResult['forecastElasticities'] = null;
  if (forecast && forecast.spec === 'per-hectare') {
    try {
      const el = elasticitiesAt(forecast.fit);
      forecastElasticities = { elasticities: el.elasticities, standardErrors: el.standardErrors };
    } catch {
      forecastElasticities = null;
    }
  }
  const bt = task.backtestSeasons > 0 ? backtest(ds, options, task.spec, task.backtestSeasons, progress) : { skill: null, table: { seasons: [], items: [], error: null } };
  progress(0.95, 'Storing the run');
  return {
    fit,
    summary,
    elasticities,
    shadowValues: shadow,
    longRun,
    longRunError,
    fittedBySeason,
    residuals,
    responseCurves,
    backtest: bt.table,
    spec: task.spec,
    forecast,
    forecastError,
    forecastElasticities,
    skill: bt.skill,
  };
}

/** Worker entry (piscina): progress goes back through the port. */
export default function fitWorker(task: FitTask): FitRunResult {
  const port = task.progressPort;
  let last = 0;
  const progress: Progress = (share, stage) => {
    const now = Date.now();
    if (now - last < 100 && share < 0.95) return;
    last = now;
    port?.postMessage({ share, stage });
  };
  try {
    return runFit(task, progress);
  } finally {
    port?.close();
  }
}
