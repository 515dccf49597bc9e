import type { Db } from '../db/client.js';
import { FIT_JOB, fitJobHandler } from '../models/models-service.js';
import { JobRunner } from './job-runner.js';
import { WorkerPool } from './worker-pool.js';

/** The worker pool and the job runner of one app instance. */
export function startBackgroundWork(db: Db, options: { threads?: number; pollMs?: number } = {}) {
  const pool = new WorkerPool(options.threads);
  const runner = new JobRunner(db, { [FIT_JOB]: { handler: fitJobHandler(db, pool) } }, options.threads ?? 2, options.pollMs ?? 250).start();
  return {
    pool,
    runner,
    async stop() {
      await runner.stop();
      await pool.close();
    },
  };
}
