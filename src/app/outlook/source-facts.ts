import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { formatDateTime, shortHash } from './outlook-format';
import type { OutlookSnapshot } from './outlook-api-types';

const FORM_WORDS: Record<string, string> = {
  nq: 'normalised quadratic',
  gl: 'generalised Leontief',
  'normalized-quadratic': 'normalised quadratic',
  'symmetric-normalized-quadratic': 'symmetric normalised quadratic',
  'generalized-leontief': 'generalised Leontief',
  translog: 'translog',
};

/** Where a published outlook's numbers come from: model run, data snapshot, simulation, publisher. */
@Component({
  selector: 'np-source-facts',
  template: `
    <dl class="facts">
      <div>
        <dt>Model</dt>
        <dd>{{ s().model.modelName }}, run #{{ s().model.runId }} ({{ form() }}, numeraire {{ s().model.numeraire }})</dd>
      </div>
      <div>
        <dt>Data</dt>
        <dd>
          {{ s().model.observations }} farm-seasons, {{ s().model.sampleSeasons.first }}–{{ s().model.sampleSeasons.last }};
          snapshot <code [attr.title]="s().model.dataHash">{{ hash() }}</code>
        </dd>
      </div>
      <div>
        <dt>Simulation</dt>
        <dd>{{ s().projection.draws }} draws, seed {{ s().projection.seed }}, {{ s().projection.farmsProjected }} farms, {{ computed() }}</dd>
      </div>
      <div>
        <dt>Published</dt>
        <dd>{{ published() }}{{ s().publishedBy ? ' by ' + s().publishedBy : '' }}</dd>
      </div>
    </dl>
  `,
  styles: `
    .facts {
      display: grid;
      grid-template-columns: repeat(auto-fit, minmax(240px, 1fr));
      gap: 8px 24px;
      margin: 0;
    }
    dt {
      font: var(--mat-sys-label-medium);
      color: var(--mat-sys-on-surface-variant);
    }
    dd {
      margin: 0;
      overflow-wrap: anywhere;
    }
    code {
      font-size: 0.9em;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SourceFacts {
  // inputs
  readonly snapshot = input.required<OutlookSnapshot>();

  protected readonly s = this.snapshot;
  protected readonly form = computed(() => FORM_WORDS[this.snapshot().model.form] ?? this.snapshot().model.form);
  protected readonly hash = computed(() => shortHash(this.snapshot().model.dataHash));
  protected readonly computed = computed(() => `projected ${formatDateTime(this.snapshot().projection.computedAt)}`);
  protected readonly published = computed(() => formatDateTime(this.snapshot().publishedAt));
}
