import { DestroyRef, computed, inject, signal } from '@angular/core';
import type { ContractedState } from '../../../shared/contracted-view';
import { errorMessage } from '../core/api-error';
import { ContractsApi } from './contracts-api';

const POLL_MS = 700;

/**
 * The contract evaluation of one outlook as the server reports it, asked again every 700 ms while its
 * job is queued or running. Made in a component's field initialiser (it injects the API and stops
 * polling when the component goes); an answer for an outlook other than the one last asked about is
 * dropped.
 */
export class ContractEvaluation {
  readonly #api = inject(ContractsApi);
  readonly #state = signal<ContractedState | null>(null);
  readonly #problem = signal<string | null>(null);
  #outlookId: number | null = null;
  #timer: ReturnType<typeof setTimeout> | undefined;

  readonly state = this.#state.asReadonly();
  readonly problem = this.#problem.asReadonly();
  readonly active = computed(() => ['queued', 'running'].includes(this.#state()?.status ?? ''));
  readonly percent = computed(() => Math.round((this.#state()?.progress ?? 0) * 100));

  constructor() {
    inject(DestroyRef).onDestroy(() => clearTimeout(this.#timer));
  }

  /** Follow the evaluation of this outlook (null: none, and nothing shown). */
  async load(outlookId: number | null): Promise<void> {
    clearTimeout(this.#timer);
    this.#outlookId = outlookId;
    if (outlookId === null) {
      this.#state.set(null);
      return;
    }
    try {
      const s = await this.#api.state(outlookId);
      if (outlookId !== this.#outlookId) return;
      this.#state.set(s);
      this.#problem.set(null);
      if (s.status === 'queued' || s.status === 'running') this.#timer = setTimeout(() => void this.load(outlookId), POLL_MS);
    } catch (error) {
      this.#problem.set(errorMessage(error));
    }
  }

  /** Start an evaluation of this outlook and follow it. */
  async evaluate(outlookId: number): Promise<void> {
    try {
      this.#state.set(await this.#api.evaluate(outlookId));
      await this.load(outlookId);
    } catch (error) {
      this.#problem.set(errorMessage(error));
    }
  }

  /** Clear the last problem (before a new attempt). */
  clearProblem(): void {
    this.#problem.set(null);
  }
}
