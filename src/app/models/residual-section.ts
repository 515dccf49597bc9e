import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import { NgxEchartsDirective } from 'ngx-echarts';
import { residualOption } from './chart-options';
import { formatAmount, ItemLabels } from './model-format';
import type { FitRunResult } from './model-types';

/** Farm-season residuals of one netput against its fitted value: a pattern means the model misses something. */
@Component({
  selector: 'np-residual-section',
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
    <p class="np-muted">
      {{ caption() }}: each dot is one farm in one season (actual − fitted, {{ labels().unit(item()) || 'item units' }}).
      Dots should scatter evenly around zero; a funnel or a curve means the model misses something.
      Root mean square error {{ rmse() }} {{ labels().unit(item()) }}.
    </p>
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: 8px; }
    .pick { max-width: 320px; }
    .chart { height: 320px; width: 100%; }
    p { margin: 0; font: var(--mat-sys-body-small); max-width: 90ch; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResidualSection {
  // inputs
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();

  protected readonly codes = computed(() => this.result().summary.items.map((i) => i.name));
  protected readonly item = linkedSignal(() => this.codes()[0] ?? '');
  protected readonly caption = computed(() => `Residuals of ${this.labels().name(this.item())} against fitted values`);
  protected readonly rmse = computed(() => formatAmount(this.result().fit.equations.find((e) => e.item === this.item())?.rmse));
  protected readonly options = computed(() => {
    const code = this.item();
    const points = this.result().residuals.map((r) => ({
      fitted: r.fitted[code] ?? NaN,
      residual: r.residual[code] ?? NaN,
      label: `${r.farm ?? 'co-op'} · ${r.season}`,
    }));
    return residualOption(points, this.labels().withUnit(code));
  });
}
