import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatProgressBar } from '@angular/material/progress-bar';

/**
 * A background job's progress while it runs: a determinate bar named for screen readers and, under
 * it, the line given as content (the job's stage and percentage, or rows written).
 */
@Component({
  selector: 'np-job-progress',
  imports: [MatProgressBar],
  template: `
    <div class="progress" role="status">
      <mat-progress-bar [mode]="waiting() ? 'query' : 'determinate'" [value]="percent()" [attr.aria-label]="label()" />
      <span class="stage"><ng-content /></span>
    </div>
  `,
  styles: `
    :host {
      display: block;
    }
    .progress {
      display: flex;
      flex-direction: column;
      gap: 6px;
    }
    .stage {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class JobProgress {
  // inputs
  /** Done so far, 0 to 100. */
  readonly percent = input.required<number>();
  /** What the bar measures, e.g. "Progress of the projection". */
  readonly label = input.required<string>();
  /** Queued and not started: the bar shows that it waits rather than a share done. */
  readonly waiting = input(false);
}
