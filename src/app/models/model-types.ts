import type { BacktestItem, BacktestSeason, FitResult, NetputRef } from '../../../shared/estimation-types';
import type { ForecastSpecName, ModelDefinition } from '../../../shared/model-schemas';
import type { BackTestResult } from '../../../shared/forecast-types';

export type { BacktestItem, BacktestSeason, CoefficientEstimate, CurvatureReport, EquationFit, FitResult, MonotonicityReport, NetputRef } from '../../../shared/estimation-types';

/**
 * The shapes the model API answers with (server/models/models-service.ts, server/jobs/fit-task.ts,
 * server/estimation/fit.ts). Declared here because those server types import Node modules the
 * client build cannot type-check; only the fields the screens read are listed. The engine's result
 * shapes (the fit, its layout, the back-test rows) are declared once in shared/estimation-types.ts.
 */
export type RunState = 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';

export const ACTIVE_STATES: readonly RunState[] = ['queued', 'running'];

/** `GET /api/model-runs/:id/status` and each entry of a model's `runs`. */
export interface RunStatus {
  id: number;
  modelId: number;
  status: RunState;
  /** 0..1 */
  progress: number;
  stage: string;
  dataHash: string;
  optionsHash: string;
  softwareVersion: string;
  error: string | null;
  rerunOf: number | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

/** `GET /api/models` rows and `GET /api/models/:id`. */
export interface ModelSummary {
  id: number;
  name: string;
  definition: ModelDefinition;
  createdBy: number | null;
  createdAt: string;
  runs: RunStatus[];
}

export interface ExcludedObservation {
  farm: string;
  season: string;
  reason: string;
}

/** The fit command's document (docs/fit-command.md §3; server/estimation/contract.ts) stored with the run. */
export interface FitSummary {
  form: FitResult['layout']['form'];
  numeraire: string;
  items: NetputRef[];
  observations: number;
  evaluatedAt: { prices: Record<string, number>; fixed: Record<string, number> };
  netputs: Record<string, number>;
  profit: number;
  elasticities: number[][];
  elasticityStandardErrors: number[][];
  convex: boolean;
  curvatureImposed: boolean;
  equations: { item: string; r2: number; rmse: number }[];
  fixedFactors: string[];
  trend: { firstSeason: number; definition: string } | null;
  shadowValues: Record<string, { value: number; standardError: number }>;
  logLikelihood: number;
  parameterCount: number;
  aic: number;
  bic: number;
  iterations: number;
  converged: boolean;
  warnings: string[];
  caution: string;
}

export interface FitRunResult {
  fit: FitResult;
  summary: FitSummary;
  shadowValues: { factor: string; value: number; standardError: number; profitElasticity: number }[];
  longRun: { items: string[]; shortRun: number[][]; longRun: number[][]; longRunStandardErrors: number[][] } | null;
  longRunError: string | null;
  fittedBySeason: { season: string; actual: Record<string, number>; fitted: Record<string, number> }[];
  residuals: { season: string; farm: string | null; fitted: Record<string, number>; residual: Record<string, number> }[];
  responseCurves: { item: string; prices: number[]; quantities: number[] }[];
  backtest: { seasons: BacktestSeason[]; items: BacktestItem[]; error: string | null };
  /** Absent in runs stored before forecasting models existed. */
  spec?: ForecastSpecName;
  /**
   * The forecasting model (server/estimation/panel.ts). For a per-hectare run its `fit` is the
   * profit function per hectare of land (netputs per ha; land itself is not a factor); only the
   * parts the page reads are declared here.
   */
  forecast?: { spec: ForecastSpecName; specification: string; landFactor: string | null; fit: FitResult } | null;
  forecastError?: string | null;
  /** Per-hectare runs: elasticities of the per-hectare profit function at its sample means (absent in older runs). */
  forecastElasticities?: { elasticities: number[][]; standardErrors: number[][] } | null;
  /** The forecasting model's rolling-origin back-test against the plain rules (absent or null: none). */
  skill?: BackTestResult | null;
}

/** `GET /api/model-runs/:id` (the snapshot itself is left out; `observations` counts it). */
export interface RunDetail extends RunStatus {
  definition: ModelDefinition;
  excluded: ExcludedObservation[];
  result: FitRunResult | null;
  createdBy: number | null;
  /** Name of the person who started the run (null when the account is gone). */
  createdByName?: string | null;
  observations: number;
}

/** `GET /api/model-runs/:id/evaluate`. */
export interface Evaluation {
  items: NetputRef[];
  point: { prices: number[]; fixed: number[] };
  /** + output supply, − input demand, in item units, layout order. */
  netputs: number[];
  profit: number;
  convex: boolean;
  elasticities: number[][];
  standardErrors: number[][];
}

export const FORM_LABELS: Record<ModelDefinition['form'] | FitResult['layout']['form'], string> = {
  nq: 'Normalised quadratic',
  gl: 'Generalised Leontief',
  'normalized-quadratic': 'Normalised quadratic',
  'generalized-leontief': 'Generalised Leontief',
};

export const CURVATURE_LABELS: Record<ModelDefinition['curvature'], string> = {
  auto: 'Impose only when the estimate breaks it',
  impose: 'Always impose',
  check: 'Check only, never impose',
};

export const STATE_LABELS: Record<RunState, string> = {
  queued: 'Waiting',
  running: 'Running',
  succeeded: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

export const FACTOR_LABELS: Record<string, string> = {
  land_ha: 'Land (ha)',
  trend: 'Trend (technical change)',
};
