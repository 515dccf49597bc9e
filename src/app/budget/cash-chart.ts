import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { formatMoney, formatMonth } from './budget-format';
import type { CashMonth } from './budget-api-types';
import { COLOUR } from '../../../shared/design-tokens';
import { CHART_TEXT } from '../shared/chart-theme';

/** Colours from the design tokens: prepaid in field olive, on terms in grain ochre, the running total in river blue. */
export const CASH_COLOURS = { prepaid: COLOUR.field, onTerms: COLOUR.grain, cumulative: COLOUR.river, compare: COLOUR.loamSoft, axis: COLOUR.loamSoft, grid: COLOUR.furrow } as const;

const TEXT = CHART_TEXT;

/** Short money for axis labels: 950k, 1.2M. */
function axisMoney(v: number): string {
  const a = Math.abs(v);
  if (a >= 1e6) return `${+(v / 1e6).toFixed(1)}M`;
  if (a >= 1e3) return `${+(v / 1e3).toFixed(0)}k`;
  return String(v);
}

export interface CashChartInput {
  scenario: string;
  months: CashMonth[];
  currency: string;
  /** Another scenario's running total to draw beside (usually the base). */
  compare?: { scenario: string; months: CashMonth[] } | null;
}

/** The chart in words, for screen readers: the span of months and the busiest one. */
export function cashDescription(scenario: string, months: CashMonth[], currency: string): string {
  if (!months.length) return `Cash by month, ${scenario}: nothing to pay`;
  const peak = months.reduce((a, m) => (m.cash > a.cash ? m : a), months[0]!);
  const total = months.at(-1)!.cumulative;
  return `Cash by month, ${scenario}, ${formatMonth(months[0]!.month)} to ${formatMonth(months.at(-1)!.month)}; most in ${formatMonth(peak.month)}: ${formatMoney(peak.cash, currency)}; ${formatMoney(total, currency)} in all`;
}

/**
 * The cash a scenario needs each month, as stacked bars (prepaid at booking, paid on terms after
 * delivery) and its running total on a second axis. Every month from the first booking to the last
 * payment is a category, so empty months show as gaps rather than vanish.
 */
export function cashChartOption({ scenario, months, currency, compare }: CashChartInput): EChartsCoreOption {
  const keys = months.map((m) => m.month);
  const other = compare ? new Map(compare.months.map((m) => [m.month, m.cumulative])) : null;
  const series: Record<string, unknown>[] = [
    { name: 'Prepaid at booking', type: 'bar', stack: 'cash', data: months.map((m) => m.prepaid), color: CASH_COLOURS.prepaid, barMaxWidth: 48 },
    { name: 'Paid on terms', type: 'bar', stack: 'cash', data: months.map((m) => m.onTerms), color: CASH_COLOURS.onTerms, barMaxWidth: 48 },
    {
      name: `Cumulative, ${scenario}`,
      type: 'line',
      yAxisIndex: 1,
      data: months.map((m) => m.cumulative),
      color: CASH_COLOURS.cumulative,
      symbol: 'circle',
      symbolSize: 6,
      lineStyle: { width: 2 },
    },
  ];
  if (compare && other) {
    series.push({
      name: `Cumulative, ${compare.scenario}`,
      type: 'line',
      yAxisIndex: 1,
      data: keys.map((k) => other.get(k) ?? null),
      color: CASH_COLOURS.compare,
      symbol: 'none',
      lineStyle: { width: 2, type: 'dashed' },
    });
  }
  const valueAxis = (name: string) => ({
    type: 'value' as const,
    name,
    nameTextStyle: { ...TEXT, fontSize: 12 },
    axisLabel: { ...TEXT, formatter: axisMoney },
    splitLine: { lineStyle: { color: CASH_COLOURS.grid } },
    axisLine: { show: true, lineStyle: { color: CASH_COLOURS.axis } },
  });
  return {
    animation: false,
    // ECharts writes this description as the chart's aria-label (instead of reading out every data point).
    aria: { enabled: true, label: { description: cashDescription(scenario, months, currency) } },
    textStyle: TEXT,
    legend: { bottom: 0, textStyle: TEXT },
    tooltip: {
      trigger: 'axis',
      valueFormatter: (v: unknown) => (typeof v === 'number' ? formatMoney(v, currency) : '—'),
    },
    grid: { left: 64, right: 64, top: 40, bottom: 76 },
    xAxis: {
      type: 'category',
      data: keys.map(formatMonth),
      axisLabel: { ...TEXT, hideOverlap: true },
      axisLine: { lineStyle: { color: CASH_COLOURS.axis } },
    },
    yAxis: [valueAxis(`${currency} per month`), { ...valueAxis(`${currency} cumulative`), splitLine: { show: false } }],
    series,
  };
}

/** The monthly cash of one scenario, drawn as SVG so it can be read in the DOM and in tests. */
@Component({
  selector: 'np-cash-chart',
  imports: [NgxEchartsDirective],
  template: `
    <div class="chart" echarts role="img" [attr.aria-label]="description()" [options]="option()" [initOpts]="{ renderer: 'svg' }"></div>
  `,
  styles: `
    :host {
      display: block;
    }
    .chart {
      width: 100%;
      height: 340px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CashChart {
  // inputs
  readonly scenario = input.required<string>();
  readonly months = input.required<CashMonth[]>();
  readonly currency = input.required<string>();
  readonly compare = input<{ scenario: string; months: CashMonth[] } | null>(null);

  protected readonly option = computed(() =>
    cashChartOption({ scenario: this.scenario(), months: this.months(), currency: this.currency(), compare: this.compare() }),
  );
  protected readonly description = computed(() => cashDescription(this.scenario(), this.months(), this.currency()));
}
