import os from 'node:os';
import { isMainThread } from 'node:worker_threads';

/**
 * Lowers the scheduling priority of the calling worker thread (nice 10), so fits, projections and
 * file checks yield the CPU to the request thread when the machine is busy: on Linux a thread's
 * nice value is its own (setpriority on "process" 0 acts on the calling thread). Never touches the
 * main thread (a test may import a task module there); elsewhere a refusal is ignored.
 */
export function lowerWorkerPriority(niceness = 10): void {
  if (isMainThread || os.platform() !== 'linux') return;
  try {
    if (os.getPriority() < niceness) os.setPriority(niceness);
  } catch {
    /* not allowed here: run at normal priority */
  }
}
