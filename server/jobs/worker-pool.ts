import os from 'node:os';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import { workerBundle } from '../core/worker-bundle.js';
import type { FitRunResult, FitTask } from './fit-task.js';
import type { OutlookProjectionResult, ProjectionTask } from '../outlook/projection-task.js';
import type { ContractedTask, ContractedTaskResult } from '../outlook/contracted-task.js';

/**
 * Worker threads for CPU-heavy work, so the request thread stays responsive. Workers run the
 * task modules compiled to plain JavaScript (workerBundle), without tsx.
 */
export class WorkerPool {
  private readonly pool: Piscina;

  constructor(size = Math.max(1, Math.min(2, os.availableParallelism() - 0))) {
    this.pool = new Piscina({
      filename: workerBundle(new URL('./fit-task.ts', import.meta.url)),
      minThreads: 0,
      maxThreads: size,
      idleTimeout: 30_000,
      execArgv: [],
    });
  }

  runFit(task: Omit<FitTask, 'progressPort'>, onProgress: (share: number, stage: string) => void, signal?: AbortSignal): Promise<FitRunResult> {
    const channel = new MessageChannel();
    channel.port2.on('message', (m: { share: number; stage: string }) => onProgress(m.share, m.stage));
    channel.port2.unref();
    return this.pool
      .run({ ...task, progressPort: channel.port1 }, { transferList: [channel.port1], signal })
      .finally(() => channel.port2.close()) as Promise<FitRunResult>;
  }

  /** A season projection (server/outlook/projection-task.ts) on the same threads. */
  runProjection(task: ProjectionTask, signal?: AbortSignal): Promise<OutlookProjectionResult> {
    return this.pool.run(task, { filename: workerBundle(new URL('../outlook/projection-task.ts', import.meta.url)), signal }) as Promise<OutlookProjectionResult>;
  }

  /**
   * Marginal costs and conditional input demands of committed outputs (server/outlook/contracted-task.ts,
   * docs/cost-duality.md) on the same threads, with progress.
   */
  runContracted(task: Omit<ContractedTask, 'progressPort'>, onProgress: (share: number, stage: string) => void = () => {}, signal?: AbortSignal): Promise<ContractedTaskResult> {
    const channel = new MessageChannel();
    channel.port2.on('message', (m: { share: number; stage: string }) => onProgress(m.share, m.stage));
    channel.port2.unref();
    return this.pool
      .run(
        { ...task, progressPort: channel.port1 },
        { filename: workerBundle(new URL('../outlook/contracted-task.ts', import.meta.url)), transferList: [channel.port1], signal },
      )
      .finally(() => channel.port2.close()) as Promise<ContractedTaskResult>;
  }

  get threads() {
    return this.pool.threads.length;
  }

  close() {
    return this.pool.destroy();
  }
}
