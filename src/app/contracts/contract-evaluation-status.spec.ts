import { computed, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { ContractedState } from '../../../shared/contracted-view';
import type { ContractEvaluation } from './contract-evaluation';
import { ContractEvaluationStatus } from './contract-evaluation-status';

/** The signals of a ContractEvaluation, set by the test instead of the server. */
function fakeEvaluation() {
  const state = signal<ContractedState | null>(null);
  const problem = signal<string | null>(null);
  const evaluation = {
    state,
    problem,
    active: computed(() => ['queued', 'running'].includes(state()?.status ?? '')),
    percent: computed(() => Math.round((state()?.progress ?? 0) * 100)),
  };
  return { state, problem, evaluation: evaluation as unknown as ContractEvaluation };
}

const at = (status: ContractedState['status'], progress: number, stage: string): ContractedState => ({ status, progress, stage, error: null, stale: false, view: null });

describe('ContractEvaluationStatus', () => {
  async function render() {
    const fake = fakeEvaluation();
    const fixture = TestBed.createComponent(ContractEvaluationStatus);
    fixture.componentRef.setInput('evaluation', fake.evaluation);
    await fixture.whenStable();
    const root = fixture.nativeElement as HTMLElement;
    return { ...fake, root, settle: () => fixture.whenStable() };
  }

  it('shows the bar and the stage while the job runs, and nothing once it is done', async () => {
    const t = await render();
    expect(t.root.textContent!.trim()).toBe('');

    t.state.set(at('queued', 0, ''));
    await t.settle();
    expect(t.root.querySelector('np-job-progress')?.textContent!.trim()).toBe('Waiting for a worker · 0 %');
    expect(t.root.querySelector('mat-progress-bar')?.getAttribute('aria-label')).toBe('Progress of the contract evaluation');

    t.state.set(at('running', 0.426, 'Farm 3 of 7'));
    await t.settle();
    expect(t.root.querySelector('np-job-progress')?.textContent!.trim()).toBe('Farm 3 of 7 · 43 %');

    t.state.set(at('succeeded', 1, ''));
    await t.settle();
    expect(t.root.querySelector('np-job-progress')).toBeNull();
  });

  it('says the problem as an alert', async () => {
    const t = await render();
    t.problem.set('The server could not be reached.');
    await t.settle();
    const alert = t.root.querySelector('[role=alert]');
    expect(alert?.textContent).toBe('The server could not be reached.');
    expect(alert?.classList).toContain('np-error-text');
  });
});
