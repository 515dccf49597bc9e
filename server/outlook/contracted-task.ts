import type { MessagePort } from 'node:worker_threads';
import { evaluateContracted, isEstimationInputError, type ContractedEvaluation, type ContractedOptions, type ForecastModel } from '../estimation/index.js';
import { lowerWorkerPriority } from '../jobs/worker-priority.js';

lowerWorkerPriority();

/**
 * What the contracted-output worker is given: plain JSON (the forecasting model of a run and the
 * farms' commitments), so it crosses the thread boundary unchanged. Method: docs/cost-duality.md.
 */
export interface ContractedTask {
  model: ForecastModel;
  options: Omit<ContractedOptions, 'onProgress'>;
  progressPort?: MessagePort;
}

/**
 * The worker's answer. Bad options (an unknown item, a committed input, a non-positive quantity)
 * come back as `{ ok: false, error }` with the engine's message (map it to 422); a commitment the
 * fitted technology cannot reach is not an error: it is in the farm's `issues`, in words.
 */
export type ContractedTaskResult =
  | { ok: true; result: ContractedEvaluation }
  | { ok: false; error: { message: string; row?: number; column?: string } };

/** Run in the calling thread (tests, the command line) — the worker does the same. */
export function runContractedTask(task: Omit<ContractedTask, 'progressPort'>, onProgress?: (share: number, stage: string) => void): ContractedTaskResult {
  try {
    return { ok: true, result: evaluateContracted(task.model, { ...task.options, ...(onProgress ? { onProgress } : {}) }) };
  } catch (err) {
    if (isEstimationInputError(err))
      return { ok: false, error: { message: err.message, ...(err.row !== undefined ? { row: err.row } : {}), ...(err.column !== undefined ? { column: err.column } : {}) } };
    throw err;
  }
}

/** Worker entry (piscina, via WorkerPool.runContracted): progress goes back through the port. */
export default function contractedWorker(task: ContractedTask): ContractedTaskResult {
  const port = task.progressPort;
  let last = 0;
  return runContractedTask({ model: task.model, options: task.options }, (share, stage) => {
    const now = Date.now();
    if (now - last < 100 && share < 0.95) return;
    last = now;
    port?.postMessage({ share, stage });
  });
}
