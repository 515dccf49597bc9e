import { DestroyRef, inject, signal, untracked, type Signal } from '@angular/core';
import { ACTIVE_STATES, type RunStatus } from './models-api-types';
import { ModelsApi } from './models-api';

/** How often a waiting or running fit is asked for its progress. */
export const POLL_INTERVAL_MS = 1000;

/**
 * Follows runs that are still waiting or running by polling `GET /api/model-runs/:id/status`,
 * and calls `settled` once for each run that reaches an end state (finished, failed, cancelled).
 * Call in an injection context; polling stops with the component.
 */
export function pollRunStatuses(
  runs: Signal<readonly RunStatus[]>,
  settled: (status: RunStatus) => void,
): { live: Signal<ReadonlyMap<number, RunStatus>>; problem: Signal<string | null> } {
  const api = inject(ModelsApi);
  const live = signal<ReadonlyMap<number, RunStatus>>(new Map());
  const problem = signal<string | null>(null);
  const done = new Set<number>();
  let busy = false;

  const tick = async () => {
    if (busy) return;
    const active = untracked(runs).filter((r) => ACTIVE_STATES.includes((live().get(r.id) ?? r).status) && !done.has(r.id));
    if (active.length === 0) return;
    busy = true;
    try {
      const answers = await Promise.all(active.map((r) => api.status(r.id)));
      const next = new Map(live());
      for (const s of answers) {
        next.set(s.id, s);
        if (!ACTIVE_STATES.includes(s.status) && !done.has(s.id)) {
          done.add(s.id);
          settled(s);
        }
      }
      live.set(next);
      problem.set(null);
    } catch {
      problem.set('The progress could not be read just now; trying again.');
    } finally {
      busy = false;
    }
  };

  const timer = setInterval(() => void tick(), POLL_INTERVAL_MS);
  inject(DestroyRef).onDestroy(() => clearInterval(timer));
  return { live: live.asReadonly(), problem: problem.asReadonly() };
}
