import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButton } from '@angular/material/button';

/**
 * What a page could not load, the server's reason, and a button to ask again:
 * `<p npLoadProblem what="The farms" [problem]="problem" (retry)="farms.reload()"></p>`. The host is the
 * page's own paragraph, so the page's paragraph styles (margins) still apply to it.
 */
@Component({
  selector: 'p[npLoadProblem]',
  imports: [MatButton],
  host: { class: 'np-error-text', role: 'alert' },
  template: `
    {{ what() }} could not be loaded: {{ problem() }}
    <button matButton type="button" (click)="retry.emit()">Try again</button>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoadProblem {
  /** What was being loaded, as the sentence's subject ("The farms"). */
  readonly what = input.required<string>();
  /** The reason, as the server or the network gave it. */
  readonly problem = input.required<string>();
  readonly retry = output();
}
