/**
 * The worker-thread side of validation: reads and checks one file and answers plain data, so the
 * CPU-heavy part of an import (parsing up to 20 MB, checking up to 200,000 rows) never runs on the
 * request thread. A file that cannot be used answers `{ ok: false }` with the HTTP status to give.
 * The checked rows travel packed in columns, transferred rather than copied.
 */
import { move, transferableSymbol, valueSymbol } from 'piscina';
import type { Lookups, ValidationOptions, ValidationOutcome } from './import-types.js';
import { ImportFileError } from './import-file-error.js';
import { IMPORT_LIMITS, type ImportLimits } from './import-limits.js';
import { validateImport } from './import-validator.js';
import { packWrites, transferList, type PackedWrites } from './packed-rows.js';
import { lowerWorkerPriority } from '../jobs/worker-priority.js';

lowerWorkerPriority();

export interface ValidationTask {
  bytes: Uint8Array;
  options: ValidationOptions;
  lookups: Lookups;
  limits?: ImportLimits;
}

export type ValidationAnswer =
  | { ok: true; outcome: Omit<ValidationOutcome, 'writes'>; packed: PackedWrites }
  | { ok: false; status: 400 | 413 | 422; code: string; message: string; details?: { path: string; message: string }[] };

export async function runValidationTask(task: ValidationTask): Promise<ValidationAnswer> {
  try {
    const { writes, ...outcome } = await validateImport(task.bytes, task.options, task.lookups, task.limits ?? IMPORT_LIMITS);
    return { ok: true, outcome, packed: packWrites(writes) };
  } catch (err) {
    if (err instanceof ImportFileError) return { ok: false, status: err.status, code: err.code, message: err.message, details: err.details };
    throw err;
  }
}

export default async function task(t: ValidationTask) {
  const answer = await runValidationTask(t);
  if (!answer.ok) return answer;
  return move({ [transferableSymbol]: transferList(answer.packed), [valueSymbol]: answer } as never);
}
