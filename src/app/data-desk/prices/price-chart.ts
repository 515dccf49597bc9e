import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { provideCharts } from '../../shared/charts';
import type { PriceSeries } from '../../../../shared/api-types';
import { SERIES } from '../../../../shared/design-tokens';

/** Line colours: the chart series of the design tokens (olive and ochre first). */
const PALETTE: readonly string[] = SERIES;

const PANEL_HEIGHT = 200;
const PANEL_GAP = 64;
const TOP = 48;

export function formatPrice(value: number): string {
  const abs = Math.abs(value);
  const digits = abs < 10 ? 3 : 2;
  return value.toLocaleString('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits });
}

/** Axis ticks need fewer digits than values: 700, 2.5, 0.85. */
export function formatAxis(value: number): string {
  const abs = Math.abs(value);
  const digits = abs >= 100 ? 0 : abs >= 10 ? 1 : 2;
  return value.toLocaleString('en-GB', { maximumFractionDigits: digits });
}

interface Panel {
  key: string;
  axisName: string;
  series: PriceSeries['series'];
}

/**
 * The series in panels, one per price unit (EUR/t, EUR/kg N, ...): items priced in the same unit
 * share an axis, items in different units never do.
 */
export function panelsOf(data: PriceSeries): Panel[] {
  const panels = new Map<string, Panel>();
  for (const s of data.series) {
    const currency = s.currency || '?';
    const key = `${currency}/${s.unit}`;
    const axisName = data.deflator ? `${currency}/${s.unit}, real (${data.deflator.base})` : `${currency}/${s.unit}`;
    const panel = panels.get(key) ?? { key, axisName, series: [] };
    panel.series.push(s);
    panels.set(key, panel);
  }
  return [...panels.values()];
}

export function chartHeight(data: PriceSeries | null): number {
  const n = data ? Math.max(1, panelsOf(data).length) : 1;
  return TOP + n * PANEL_HEIGHT + (n - 1) * PANEL_GAP + 56;
}

/** One sentence for screen readers: what is drawn, over which seasons, in which units. */
export function describeSeries(data: PriceSeries): string {
  const range = data.seasons.length ? `${data.seasons[0]} to ${data.seasons[data.seasons.length - 1]}` : 'no seasons';
  const kind = data.deflator ? `deflated by ${data.deflator.name} (${data.deflator.base})` : 'nominal';
  return `Mean price per season, ${kind}, ${range}: ${data.series.map((s) => `${s.itemName} in ${s.currency}/${s.unit}`).join('; ')}.`;
}

/** The ECharts option for the series: one grid per unit, a shared season axis, nulls left as gaps. */
export function priceChartOption(data: PriceSeries): EChartsCoreOption {
  const panels = panelsOf(data);
  const colourOf = new Map(data.series.map((s, i) => [s.itemCode, PALETTE[i % PALETTE.length]]));
  const grids = panels.map((_, i) => ({ left: 72, right: 24, top: TOP + i * (PANEL_HEIGHT + PANEL_GAP), height: PANEL_HEIGHT }));
  return {
    animation: false,
    color: data.series.map((s) => colourOf.get(s.itemCode) ?? PALETTE[0]),
    legend: { top: 0, type: 'scroll', data: data.series.map((s) => s.itemName) },
    tooltip: {
      trigger: 'axis',
      valueFormatter: (v: unknown) => (typeof v === 'number' ? formatPrice(v) : 'no price'),
    },
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    grid: grids,
    xAxis: panels.map((_, i) => ({
      type: 'category',
      gridIndex: i,
      data: data.seasons,
      boundaryGap: false,
      axisLabel: { hideOverlap: true },
    })),
    yAxis: panels.map((p, i) => ({
      type: 'value',
      gridIndex: i,
      scale: true,
      name: p.axisName,
      nameLocation: 'end',
      nameGap: 12,
      nameTextStyle: { align: 'left' },
      axisLabel: { formatter: (v: number) => formatAxis(v) },
    })),
    series: panels.flatMap((p, i) =>
      p.series.map((s) => ({
        type: 'line',
        name: s.itemName,
        xAxisIndex: i,
        yAxisIndex: i,
        data: s.values,
        connectNulls: false,
        showSymbol: true,
        symbolSize: 5,
        lineStyle: { width: 2, color: colourOf.get(s.itemCode) },
        itemStyle: { color: colourOf.get(s.itemCode) },
      })),
    ),
  };
}

/** Mean price per season of several items, nominal or deflated; SVG so it can be read and tested in the DOM. */
@Component({
  selector: 'np-price-chart',
  imports: [NgxEchartsDirective],
  providers: [provideCharts()],
  template: `
    @if (option(); as option) {
      <div
        class="chart"
        echarts
        role="img"
        [attr.aria-label]="description()"
        [options]="option"
        [initOpts]="{ renderer: 'svg' }"
        [style.height.px]="height()"
      ></div>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .chart {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PriceChart {
  readonly data = input<PriceSeries | null>(null);

  protected readonly option = computed(() => {
    const data = this.data();
    return data && data.series.length > 0 ? priceChartOption(data) : null;
  });
  protected readonly height = computed(() => chartHeight(this.data()));
  protected readonly description = computed(() => {
    const data = this.data();
    return data ? describeSeries(data) : '';
  });
}
