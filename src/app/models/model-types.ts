import type { FitResult, FitRunResult, NetputRef } from '../../../shared/estimation-types';
import type { ModelDefinition } from '../../../shared/model-schemas';

export type {
  BacktestItem,
  BacktestSeason,
  CoefficientEstimate,
  CurvatureReport,
  EquationFit,
  FitResult,
  FitRunResult,
  FitSummary,
  MonotonicityReport,
  NetputRef,
} from '../../../shared/estimation-types';

/**
 * The shapes the model API answers with. A run's result (the fit, its summary document, the
 * back-tests and the forecasting model) is declared once in shared/estimation-types.ts, which the
 * engine returns; the run and model rows below (server/models/models-service.ts) are declared here
 * because those server types import Node modules the client build cannot type-check; only the
 * fields the screens read are listed.
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
