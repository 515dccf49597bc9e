import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { UnitSystem } from '../../../shared/units';
import { formatMoney, formatMonth, formatTonnes } from './budget-format';
import type { ScenarioResult } from './budget-api-types';
import { unitLabels } from './budget-units';
import { CashChart } from './cash-chart';

/** A scenario's cash by month: the chart, the months as figures, and what prepaying earns and costs. */
@Component({
  selector: 'np-cash-section',
  imports: [CashChart],
  templateUrl: './cash-section.html',
  styleUrl: './cash-section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CashSection {
  // inputs
  readonly scenario = input.required<ScenarioResult>();
  /** The base, drawn beside when another scenario is shown. */
  readonly base = input<ScenarioResult | null>(null);
  readonly currency = input.required<string>();
  readonly system = input.required<UnitSystem>();

  protected readonly labels = computed(() => unitLabels(this.system(), this.currency()));
  protected readonly month = formatMonth;
  protected readonly tonnes = formatTonnes;
  protected readonly compare = computed(() => {
    const b = this.base();
    return b && b.name !== this.scenario().name ? { scenario: b.name, months: b.cash.months } : null;
  });
  protected readonly totals = computed(() => this.scenario().cash.totals);

  protected money(v: number | null | undefined): string {
    return formatMoney(v, this.currency());
  }
}
