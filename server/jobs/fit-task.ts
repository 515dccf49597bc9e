import type { MessagePort } from 'node:worker_threads';
import {
  elasticitiesAt,
  evaluateFit,
  fitProfitFunction,
  fitToContractJson,
  longRunResponse,
  shadowValues,
  type FitOptions,
  type FitResult,
  type NetputDataset,
} from '../estimation/index.js';
import { lowerWorkerPriority } from './worker-priority.js';

lowerWorkerPriority();

/** What the fit worker is given: plain JSON, so it crosses the thread boundary unchanged. */
export interface FitTask {
  dataset: NetputDataset;
  options: FitOptions;
  backtestSeasons: number;
  progressPort?: MessagePort;
}

export interface BacktestSeason {
  season: string;
  /** Co-op totals (quantities ≥ 0 in item units) predicted at the prices actually seen, and actual. */
  predicted: Record<string, number>;
  actual: Record<string, number>;
  fittedOn: { first: string; last: string; observations: number };
}

export interface BacktestItem {
  item: string;
  /** Mean absolute percentage error over the back-tested seasons, in %. */
  mape: number;
  /** Mean of (predicted − actual) / actual, in % (positive: the model over-projects). */
  bias: number;
}

export interface FitRunResult {
  fit: FitResult;
  summary: ReturnType<typeof fitToContractJson>;
  elasticities: ReturnType<typeof elasticitiesAt>;
  shadowValues: ReturnType<typeof shadowValues>;
  longRun: ReturnType<typeof longRunResponse> | null;
  longRunError: string | null;
  /** Per season: co-op totals, actual and fitted (quantities ≥ 0). */
  fittedBySeason: { season: string; actual: Record<string, number>; fitted: Record<string, number> }[];
  /** Per observation: residual (actual − fitted quantity) of every item. */
  residuals: { season: string; farm: string | null; fitted: Record<string, number>; residual: Record<string, number> }[];
  /** Each netput against its own price, other prices at their means. */
  responseCurves: { item: string; prices: number[]; quantities: number[] }[];
  backtest: { seasons: BacktestSeason[]; items: BacktestItem[]; error: string | null };
}

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

function subset(ds: NetputDataset, keep: (obs: number) => boolean): NetputDataset {
  const idx = ds.seasons.map((_, i) => i).filter(keep);
  return {
    ...ds,
    seasons: idx.map((i) => ds.seasons[i]),
    seasonYears: idx.map((i) => ds.seasonYears[i]),
    farms: ds.farms ? idx.map((i) => ds.farms![i]) : null,
    prices: ds.prices.map((col) => idx.map((i) => col[i])),
    quantities: ds.quantities.map((col) => idx.map((i) => col[i])),
    fixed: ds.fixed.map((col) => idx.map((i) => col[i])),
    rows: idx.map((i) => ds.rows[i]),
  };
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

/** Rolling origin: fit on the seasons before t, project t at the prices seen, compare with what happened. */
export function backtest(ds: NetputDataset, options: FitOptions, k: number, progress: Progress): FitRunResult['backtest'] {
  const years = [...new Set(ds.seasonYears)].sort((a, b) => a - b);
  const targets = years.slice(Math.max(1, years.length - k));
  const seasons: BacktestSeason[] = [];
  let error: string | null = null;
  targets.forEach((year, n) => {
    progress(0.3 + (0.6 * n) / targets.length, `Back-testing ${n + 1} of ${targets.length}`);
    const train = subset(ds, (i) => ds.seasonYears[i] < year);
    const test = subset(ds, (i) => ds.seasonYears[i] === year);
    try {
      const fit = fitProfitFunction(train, options);
      const season = test.seasons[0];
      seasons.push({
        season,
        predicted: seasonTotals(test, season, (obs) => fittedAt(test, fit, obs)),
        actual: seasonTotals(test, season, (obs) => actualAt(test, obs)),
        fittedOn: { first: train.seasons[0], last: train.seasons.at(-1)!, observations: train.seasons.length },
      });
    } catch (err) {
      error ??= `Back-test of ${year} could not be fitted: ${(err as Error).message}`;
    }
  });
  const items = ds.items.map((it) => {
    const pct = seasons.filter((s) => s.actual[it.name] > 0).map((s) => (s.predicted[it.name] - s.actual[it.name]) / s.actual[it.name]);
    return {
      item: it.name,
      mape: pct.length ? (100 * pct.reduce((a, b) => a + Math.abs(b), 0)) / pct.length : NaN,
      bias: pct.length ? (100 * pct.reduce((a, b) => a + b, 0)) / pct.length : NaN,
    };
  });
  return { seasons, items, error };
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
  const bt = task.backtestSeasons > 0 ? backtest(ds, options, task.backtestSeasons, progress) : { seasons: [], items: [], error: null };
  progress(0.95, 'Storing the run');
  return { fit, summary, elasticities, shadowValues: shadow, longRun, longRunError, fittedBySeason, residuals, responseCurves, backtest: bt };
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
