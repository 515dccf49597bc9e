import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { fittedOption } from './chart-options';
import { ItemLabels } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';
import { NetputChart } from './netput-chart';

/** Co-op totals by season for one netput: what members delivered or bought, and what the model fits. */
@Component({
  selector: 'np-fitted-section',
  imports: [NetputChart],
  template: `
    <np-netput-chart [codes]="codes()" [labels]="labels()" [(item)]="item" [options]="options()" [caption]="caption()">
      <p class="np-muted">{{ caption() }}. Quantities are the sum over the farms in the sample, in {{ labels().unit(item()) || 'item units' }}.</p>
    </np-netput-chart>
  `,
  styles: `
    :host { display: block; }
    p { margin: 0; font: var(--mat-sys-body-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FittedSection {
  // inputs
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();

  protected readonly codes = computed(() => this.result().summary.items.map((i) => i.name));
  protected readonly item = linkedSignal(() => this.codes()[0] ?? '');
  protected readonly caption = computed(() => `Actual and fitted ${this.labels().name(this.item())} by season`);
  protected readonly options = computed(() => {
    const rows = this.result().fittedBySeason;
    const code = this.item();
    return fittedOption(
      rows.map((r) => r.season),
      rows.map((r) => r.actual[code] ?? NaN),
      rows.map((r) => r.fitted[code] ?? NaN),
      this.labels().withUnit(code),
      this.labels().unit(code),
    );
  });
}
