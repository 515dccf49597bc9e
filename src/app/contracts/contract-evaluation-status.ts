import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { JobProgress } from '../shared/job-progress';
import type { ContractEvaluation } from './contract-evaluation';

/**
 * What a contract evaluation is doing, where a section shows it: the last problem asking the server,
 * and the job's bar and stage while it is queued or running. The section says the rest (not evaluated,
 * failed, the results): `<np-contract-evaluation-status [evaluation]="evaluation" />`. Its host draws no
 * box, so the lines sit in the section's column like its own.
 */
@Component({
  selector: 'np-contract-evaluation-status',
  imports: [JobProgress],
  template: `
    @if (evaluation().problem(); as p) {
      <p class="np-error-text" role="alert">{{ p }}</p>
    }
    @if (evaluation().active()) {
      <np-job-progress [percent]="evaluation().percent()" label="Progress of the contract evaluation"
        >{{ evaluation().state()?.stage || 'Waiting for a worker' }} · {{ evaluation().percent() }} %</np-job-progress
      >
    }
  `,
  styles: `
    :host {
      display: contents;
    }
    p {
      margin: 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ContractEvaluationStatus {
  readonly evaluation = input.required<ContractEvaluation>();
}
