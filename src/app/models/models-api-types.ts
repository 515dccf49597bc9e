import type { FitRunResult, NetputRef } from '../../../shared/estimation-types';
import type { ModelDefinition } from '../../../shared/model-schemas';

/**
 * The shapes the model API answers with: the model and run rows (server/models/models-service.ts),
 * declared here because those server types import Node modules the client build cannot
 * type-check; only the fields the screens read are listed. A run's result (the fit, its summary
 * document, the back-tests and the forecasting model) is the engine's own type: import it from
 * shared/estimation-types.ts. The words for these values (states, forms, curvature) are in
 * model-format.ts.
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
