import type { Db } from '../db/client.js';
import type { Mailer } from '../mail/mailer.js';
import { OutboxDispatcher } from '../mail/outbox-dispatcher.js';
import { FIT_JOB, fitJobHandler } from '../models/models-service.js';
import { OUTLOOK_PROJECTION_JOB, projectionJobHandler } from '../outlook/projection-service.js';
import { JobRunner } from './job-runner.js';
import { CONTRACTED_JOB, contractedJobHandler } from '../contracts/contracted-service.js';
import type { Config } from '../config.js';
import { DEMO_SETUP_JOB, demoSetupJobHandler } from '../../seed/prepare-demo.js';
import { WorkerPool } from './worker-pool.js';

/**
 * The worker pool, the job runner and (given a mailer) the mail outbox dispatcher of one app instance.
 * OUTBOX_SEND_DELAY_MS pauses each send between its claim and SMTP (crash tests only).
 */
export function startBackgroundWork(db: Db, options: { threads?: number; pollMs?: number; mailer?: Mailer; config?: Pick<Config, 'publicUrl' | 'mailFrom'> } = {}) {
  const pool = new WorkerPool(options.threads);
  let stopping = false;
  const config = options.config ?? { publicUrl: '', mailFrom: 'netput@example.org' };
  const runner = new JobRunner(
    db,
    {
      [FIT_JOB]: { handler: fitJobHandler(db, pool) },
      [OUTLOOK_PROJECTION_JOB]: { handler: projectionJobHandler(db, pool) },
      [CONTRACTED_JOB]: { handler: contractedJobHandler(db, pool), maxAttempts: 1 },
      // Waits for the fit and projection jobs it queues; at shutdown it gives up and is queued again.
      [DEMO_SETUP_JOB]: { handler: demoSetupJobHandler(db, config, () => stopping), maxAttempts: 5, backoffMs: 2000 },
    },
    options.threads ?? 2,
    options.pollMs ?? 250,
  ).start();
  const outbox = options.mailer
    ? new OutboxDispatcher(db, options.mailer, { pollMs: options.pollMs ?? 500, sendDelayMs: Number(process.env.OUTBOX_SEND_DELAY_MS ?? 0) || 0 }).start()
    : undefined;
  return {
    pool,
    runner,
    outbox,
    async stop() {
      stopping = true;
      await outbox?.stop();
      await runner.stop();
      await pool.close();
    },
  };
}
