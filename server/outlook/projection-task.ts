import { projectSeason, type FitResult, type ProjectionOptions, type ProjectionResult } from '../estimation/index.js';
import { lowerWorkerPriority } from '../jobs/worker-priority.js';

lowerWorkerPriority();

/** What the projection worker is given: plain JSON, so it crosses the thread boundary unchanged. */
export interface ProjectionTask {
  fit: FitResult;
  options: ProjectionOptions;
}

/** Worker entry (piscina, via WorkerPool.runProjection): the engine's Monte Carlo projection. */
export default function projectionWorker(task: ProjectionTask): ProjectionResult {
  return projectSeason(task.fit, task.options);
}
