import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import { NgxEchartsDirective } from 'ngx-echarts';
import { fittedOption } from './chart-options';
import { ItemLabels } from './model-format';
import type { FitRunResult } from './model-types';

/** Co-op totals by season for one netput: what members delivered or bought, and what the model fits. */
@Component({
  selector: 'np-fitted-section',
  imports: [MatFormField, MatLabel, MatSelect, MatOption, NgxEchartsDirective],
  template: `
    <mat-form-field class="pick">
      <mat-label>Netput</mat-label>
      <mat-select [value]="item()" (valueChange)="item.set($event)">
        @for (code of codes(); track code) {
          <mat-option [value]="code">{{ labels().name(code) }}</mat-option>
        }
      </mat-select>
    </mat-form-field>
    <div class="chart" echarts [options]="options()" [initOpts]="{ renderer: 'svg' }" role="img" [attr.aria-label]="caption()"></div>
    <p class="np-muted">{{ caption() }}. Quantities are the sum over the farms in the sample, in {{ labels().unit(item()) || 'item units' }}.</p>
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: 8px; }
    .pick { max-width: 320px; }
    .chart { height: 320px; width: 100%; }
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
