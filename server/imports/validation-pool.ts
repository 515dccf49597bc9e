import { Piscina } from 'piscina';
import { AppError } from '../core/app-error.js';
import { workerBundle } from '../core/worker-bundle.js';
import type { Lookups, ValidationOptions, ValidationOutcome } from './import-types.js';
import type { ImportLimits } from './import-limits.js';
import { unpackedView, type WriteSet } from './packed-rows.js';
import type { ValidationAnswer, ValidationTask } from './validation-task.js';

/** One file at a time: a 20 MB file may take a few hundred MB while it is read. */
const THREADS = 1;
const TASK_TIMEOUT_MS = 120_000;
/** Heap cap of the worker: a file that needs more is refused (422), the server keeps running. */
const WORKER_HEAP_MB = 1024;

let pool: Piscina | null = null;

function getPool(): Piscina {
  pool ??= new Piscina({
    filename: workerBundle(new URL('./validation-task.ts', import.meta.url)),
    minThreads: 0,
    maxThreads: THREADS,
    idleTimeout: 60_000,
    // A small young generation keeps the worker's resident memory down; the rows it keeps are packed.
    resourceLimits: { maxOldGenerationSizeMb: WORKER_HEAP_MB, maxYoungGenerationSizeMb: 16 },
    // Plain JavaScript (see workerBundle): the parent's own flags (tsx, --expose-gc, --inspect,
    // vitest's) may not be valid in a worker.
    execArgv: [],
  });
  return pool;
}

/**
 * Validates a file in a worker thread. An unusable file becomes an AppError with its status (400,
 * 413, 422); a worker that runs out of memory or time becomes a 422 as well.
 */
export type CheckedFile = Omit<ValidationOutcome, 'writes'> & { writes: WriteSet };

export async function validateInWorker(bytes: Uint8Array, options: ValidationOptions, lookups: Lookups, limits?: ImportLimits): Promise<CheckedFile> {
  // A copy the worker can own: the transfer moves it without another copy.
  const copy = new Uint8Array(bytes);
  const task: ValidationTask = { bytes: copy, options, lookups, limits };
  let answer: ValidationAnswer;
  try {
    answer = (await getPool().run(task, { transferList: [copy.buffer], signal: AbortSignal.timeout(TASK_TIMEOUT_MS) })) as ValidationAnswer;
  } catch (err) {
    const code = (err as { code?: string }).code;
    if (code === 'ERR_WORKER_OUT_OF_MEMORY') {
      throw AppError.unprocessable('Reading the file needs more memory than the server allows; split it into smaller files or save it as CSV');
    }
    if ((err as Error).name === 'AbortError' || (err as Error).name === 'TimeoutError') {
      throw AppError.unprocessable(`Reading the file took longer than ${TASK_TIMEOUT_MS / 60_000} minutes; split it into smaller files`);
    }
    throw err;
  }
  if (!answer.ok) throw new AppError(answer.status, answer.code, answer.message, answer.details);
  return { ...answer.outcome, writes: unpackedView(answer.packed) };
}

/** Stops the worker threads (benchmarks and scripts that should exit promptly). */
export async function closeValidationPool() {
  const p = pool;
  pool = null;
  if (p) await p.destroy();
}
