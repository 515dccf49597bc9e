import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { missesBySeasonOption } from './chart-options';
import { formatAmount, ItemLabels } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';
import { NetputChart } from './netput-chart';

/** Each farm's miss on one netput, season by season: a season off the zero line is one the model did not see coming. */
@Component({
  selector: 'np-residual-section',
  imports: [NetputChart],
  template: `
    <np-netput-chart [codes]="codes()" [labels]="labels()" [(item)]="item" [options]="options()" [caption]="caption()">
      <p class="np-muted">
        {{ caption() }}: each dot is one farm in one season, what it actually {{ verb() }} less what the model gives it
        ({{ labels().unit(item()) || 'item units' }}). Dots spread evenly either side of zero in every season are what a sound model leaves;
        a season sitting above or below the line is one the model did not see coming. A typical miss is {{ rmse() }} {{ labels().unit(item()) }}.
      </p>
    </np-netput-chart>
  `,
  styles: `
    :host { display: block; }
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
  protected readonly caption = computed(() => `How far each farm's ${this.labels().name(this.item()).toLowerCase()} ${this.verb() === 'delivered' ? 'supply' : 'use'} was from the model, by season`);
  protected readonly verb = computed(() => (this.result().summary.items.find((i) => i.name === this.item())?.role === 'input' ? 'used' : 'delivered'));
  protected readonly rmse = computed(() => formatAmount(this.result().fit.equations.find((e) => e.item === this.item())?.rmse));
  protected readonly options = computed(() => {
    const code = this.item();
    const residuals = this.result().residuals;
    const points = residuals.map((r) => ({
      season: String(r.season),
      residual: r.residual[code] ?? NaN,
      label: `${r.farm ?? 'co-op'} · ${r.season}`,
    }));
    const seasons = [...new Set(points.map((p) => p.season))].sort();
    return missesBySeasonOption(points, seasons, this.labels().unit(code));
  });
}
