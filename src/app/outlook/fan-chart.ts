import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { formatQuantity } from './outlook-format';
import { SCENARIO_NAMES, scenarioLabel, type History, type ItemProjection, type QuantitySummary } from './outlook-api-types';
import { COLOUR } from '../../../shared/design-tokens';
import { CHART_TEXT } from '../shared/chart-theme';

/** Colours from the design tokens: recorded seasons in dark loam, the scenarios in clay, field olive and river blue. */
export const FAN_COLOURS = { recorded: COLOUR.loam, low: COLOUR.clay, base: COLOUR.field, high: COLOUR.river, other: COLOUR.loamSoft, axis: COLOUR.loamSoft, grid: COLOUR.furrow } as const;

const TEXT = CHART_TEXT;

export interface FanScenario {
  /** low, base or high */
  name: string;
  /** What the legend and the tooltip call it. */
  label: string;
  q: Pick<QuantitySummary, 'median' | 'p5' | 'p95' | 'point'>;
}

export interface FanChartInput {
  itemName: string;
  unit: string;
  /** Recorded quantities of the seasons before the outlook, oldest first (null: nothing recorded). */
  history: { seasons: string[]; values: (number | null)[] };
  /** The outlook's season label, the last category. */
  season: string;
  scenarios: FanScenario[];
  /** Keep only the latest n recorded seasons (a phone has room for about ten). */
  maxHistory?: number;
  /** Smaller margins and the legend below, for a phone. */
  compact?: boolean;
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function colourOf(name: string): string {
  return (FAN_COLOURS as Record<string, string>)[name] ?? FAN_COLOURS.other;
}

/** The recorded seasons the chart shows, and the index of the last one with a figure (where the fan opens). */
export function fanWindow(input: Pick<FanChartInput, 'history' | 'maxHistory'>): { seasons: string[]; values: (number | null)[]; anchor: number | null } {
  const n = input.history.seasons.length;
  const from = input.maxHistory !== undefined ? Math.max(0, n - input.maxHistory) : 0;
  const seasons = input.history.seasons.slice(from);
  const values = input.history.values.slice(from, n).map((v) => (v === undefined || v === null || !Number.isFinite(v) ? null : v));
  let anchor: number | null = null;
  for (let i = values.length - 1; i >= 0; i--) {
    if (values[i] !== null) {
      anchor = i;
      break;
    }
  }
  return { seasons, values, anchor };
}

/**
 * A fan chart of one item: the recorded seasons as a line, then for the outlook season each price
 * scenario's projected median (dashed) inside its 5–95 % band, opening from the last recorded
 * season. The band is drawn as ECharts' stacked "confidence band": an invisible series at the 5 %
 * point and, stacked on it, the width p95 − p5 with a filled area. The three series of a scenario
 * share its name, so one legend entry shows or hides the whole fan.
 */
export function fanChartOption(input: FanChartInput): EChartsCoreOption {
  const { seasons, values, anchor } = fanWindow(input);
  const categories = [...seasons, input.season];
  const last = categories.length - 1;
  const at = (fill: (i: number) => number | null) => categories.map((_, i) => fill(i));
  const anchorValue = anchor !== null ? values[anchor]! : null;
  // The fan opens at the last recorded season and widens in a straight line to the outlook season,
  // across any season in between that has no record yet: every point of a stacked series in that
  // stretch has a value, so the band never drops to the axis.
  const share = (i: number) => (anchor === null || last === anchor ? 1 : (i - anchor) / (last - anchor));
  const inFan = (i: number) => i === last || (anchor !== null && i >= anchor);
  const along = (i: number, end: number) => (!inFan(i) ? null : anchorValue === null ? (i === last ? end : null) : anchorValue + (end - anchorValue) * share(i));
  const widthAt = (i: number, width: number) => (!inFan(i) ? null : anchorValue === null ? (i === last ? width : null) : width * share(i));

  const series: Record<string, unknown>[] = [
    {
      id: 'recorded',
      name: 'Recorded',
      type: 'line',
      data: [...values, null],
      color: FAN_COLOURS.recorded,
      symbol: 'circle',
      symbolSize: 5,
      lineStyle: { width: 2 },
      z: 5,
    },
  ];
  for (const s of input.scenarios) {
    const colour = colourOf(s.name);
    const stack = `fan-${s.name}`;
    series.push(
      {
        id: `${s.name}-p5`,
        name: s.label,
        type: 'line',
        stack,
        data: at((i) => along(i, s.q.p5)),
        color: colour,
        lineStyle: { opacity: 0 },
        symbol: 'none',
        connectNulls: true,
        silent: true,
        z: 2,
      },
      {
        id: `${s.name}-band`,
        name: s.label,
        type: 'line',
        stack,
        data: at((i) => widthAt(i, s.q.p95 - s.q.p5)),
        color: colour,
        lineStyle: { opacity: 0 },
        areaStyle: { color: colour, opacity: 0.18 },
        symbol: 'none',
        connectNulls: true,
        silent: true,
        z: 2,
      },
      {
        id: `${s.name}-median`,
        name: s.label,
        type: 'line',
        data: at((i) => along(i, s.q.median)),
        color: colour,
        lineStyle: { width: 2, type: 'dashed' },
        symbol: 'circle',
        symbolSize: (_v: unknown, p: { dataIndex: number }) => (p.dataIndex === last ? 8 : 0),
        connectNulls: true,
        z: 4,
      },
    );
  }

  const tooltipFormatter = (params: unknown): string => {
    const list = Array.isArray(params) ? (params as { dataIndex: number }[]) : [params as { dataIndex: number }];
    const i = list[0]?.dataIndex ?? 0;
    const head = `<strong>${escapeHtml(categories[i] ?? '')}</strong>`;
    if (i < last) {
      const v = values[i];
      return `${head}<br>Recorded: ${v === null || v === undefined ? 'no record' : `${formatQuantity(v)} ${escapeHtml(input.unit)}`}`;
    }
    const lines = input.scenarios.map(
      (s) =>
        `${escapeHtml(s.label)}: median ${formatQuantity(s.q.median)} ${escapeHtml(input.unit)} (5–95 %: ${formatQuantity(s.q.p5)}–${formatQuantity(s.q.p95)})`,
    );
    return [head, ...lines].join('<br>');
  };

  const compact = input.compact ?? false;
  // Label every few seasons counted back from the outlook season, so its own label always shows.
  const step = Math.max(1, Math.ceil(categories.length / (compact ? 4 : 9)));
  return {
    animation: false,
    aria: { enabled: true },
    textStyle: TEXT,
    legend: { [compact ? 'bottom' : 'top']: 0, data: ['Recorded', ...input.scenarios.map((s) => s.label)], textStyle: TEXT },
    tooltip: { trigger: 'axis', formatter: tooltipFormatter },
    grid: compact ? { left: 56, right: 12, top: 28, bottom: 64 } : { left: 72, right: 24, top: 48, bottom: 40 },
    xAxis: {
      type: 'category',
      data: categories,
      boundaryGap: false,
      axisLabel: { ...TEXT, interval: (index: number) => (last - index) % step === 0 },
      axisLine: { lineStyle: { color: FAN_COLOURS.axis } },
    },
    yAxis: {
      type: 'value',
      name: input.unit,
      scale: true,
      nameTextStyle: { ...TEXT, fontSize: 12 },
      axisLabel: { ...TEXT, formatter: (v: number) => formatQuantity(v) },
      splitLine: { lineStyle: { color: FAN_COLOURS.grid } },
    },
    series,
  };
}

/** The fan chart of one projected item (co-op or farm) with its recorded history, in the item's own unit. */
export function fanInputFor(item: ItemProjection, history: History, season: string, options: { maxHistory?: number; compact?: boolean } = {}): FanChartInput {
  return {
    itemName: item.name,
    unit: item.unit,
    history: { seasons: history.seasons, values: history.items[item.item] ?? history.seasons.map(() => null) },
    season,
    scenarios: SCENARIO_NAMES.filter((n) => item.scenarios[n]).map((n) => ({ name: n, label: scenarioLabel(n), q: item.scenarios[n]! })),
    ...options,
  };
}

/** Words for screen readers: the recorded span and each scenario's median and band. */
export function fanChartDescription(input: FanChartInput): string {
  const { seasons } = fanWindow(input);
  const span = seasons.length ? `recorded ${seasons[0]} to ${seasons[seasons.length - 1]}; ` : '';
  const fans = input.scenarios
    .map((s) => `${s.label.toLowerCase()} median ${formatQuantity(s.q.median)} (5–95 %: ${formatQuantity(s.q.p5)}–${formatQuantity(s.q.p95)})`)
    .join('; ');
  return `${input.itemName} in ${input.unit}: ${span}${input.season} ${fans}`;
}

/** One item's fan chart, drawn as SVG so it can be read in the DOM and in tests. */
@Component({
  selector: 'np-fan-chart',
  imports: [NgxEchartsDirective],
  template: `
    <figure>
      <figcaption>{{ data().itemName }} <span class="unit">({{ data().unit }})</span></figcaption>
      <div class="chart" [class.compact]="data().compact" echarts role="img" [attr.aria-label]="description()" [options]="option()" [initOpts]="{ renderer: 'svg' }"></div>
    </figure>
  `,
  styles: `
    :host {
      display: block;
      min-width: 0;
    }
    figure {
      margin: 0;
    }
    figcaption {
      font: var(--mat-sys-title-small);
    }
    .unit {
      color: var(--mat-sys-on-surface-variant);
      font-weight: 400;
    }
    .chart {
      width: 100%;
      height: 300px;
    }
    .chart.compact {
      height: 280px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FanChart {
  // inputs
  readonly data = input.required<FanChartInput>();

  protected readonly option = computed(() => fanChartOption(this.data()));
  protected readonly description = computed(() => fanChartDescription(this.data()));
}
