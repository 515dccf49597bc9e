import type { EChartsCoreOption } from 'echarts/core';
import { formatAmount } from './model-format';
import { COLOUR } from '../../../shared/design-tokens';
import { CHART_TEXT } from '../shared/chart-theme';

/** Series colours of the model charts, from the design tokens: observed figures in field green, the model's in ochre, errors in clay. */
export const CHART_COLOURS = {
  actual: COLOUR.fieldDeep,
  model: COLOUR.grain,
  second: COLOUR.river,
  error: COLOUR.clay,
  axis: COLOUR.loamSoft,
  grid: COLOUR.furrow,
} as const;

/** Axis ticks: whole numbers from 10 up, up to three decimals below (ticks are round already). */
function axisNumber(v: number): string {
  const a = Math.abs(v);
  return new Intl.NumberFormat('en', { maximumFractionDigits: a >= 10 || a === 0 ? 0 : 3 }).format(v).replace('-', '−');
}

const TEXT = CHART_TEXT;

function axisName(name: string) {
  return { name, nameLocation: 'middle' as const, nameTextStyle: { ...TEXT, fontSize: 12 } };
}

const valueAxis = {
  type: 'value' as const,
  scale: true,
  axisLabel: { ...TEXT, formatter: axisNumber },
  splitLine: { lineStyle: { color: CHART_COLOURS.grid } },
  axisLine: { lineStyle: { color: CHART_COLOURS.axis } },
};

const base = {
  aria: { enabled: true },
  animation: false,
  textStyle: TEXT,
  legend: { top: 0, textStyle: TEXT },
  tooltip: { trigger: 'axis' as const, valueFormatter: (v: unknown) => (typeof v === 'number' ? formatAmount(v) : String(v)) },
};

/** Co-op totals by season: what members delivered or bought, and what the model fits. */
export function fittedOption(seasons: string[], actual: number[], fitted: number[], quantityLabel: string, unit = ''): EChartsCoreOption {
  return {
    ...base,
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => (typeof v === 'number' ? `${formatAmount(v)}${unit ? ` ${unit}` : ''}` : String(v)) },
    grid: { left: 72, right: 16, top: 40, bottom: 56 },
    xAxis: {
      type: 'category',
      data: seasons,
      axisLabel: { ...TEXT, rotate: 45 },
      axisLine: { lineStyle: { color: CHART_COLOURS.axis } },
    },
    yAxis: { ...valueAxis, ...axisName(quantityLabel), nameGap: 60 },
    series: [
      { name: 'Actual (members)', type: 'line', data: actual, symbol: 'circle', symbolSize: 6, lineStyle: { width: 2 }, color: CHART_COLOURS.actual },
      { name: 'Fitted (model)', type: 'line', data: fitted, symbol: 'diamond', symbolSize: 7, lineStyle: { width: 2, type: 'dashed' }, color: CHART_COLOURS.model },
    ],
  };
}

export interface ResidualPoint {
  season: string;
  residual: number;
  label: string;
}

/**
 * Each farm's miss (actual − fitted) in each season, seasons along the bottom and the zero line
 * across: a season where the dots sit above or below zero is one the model did not see coming
 * (weather, a policy change), a widening spread a change in the farms.
 */
export function missesBySeasonOption(points: ResidualPoint[], seasons: string[], unit: string): EChartsCoreOption {
  const index = new Map(seasons.map((s, k) => [s, k]));
  const withUnit = (v: number) => `${formatAmount(v)}${unit ? ` ${unit}` : ''}`;
  return {
    ...base,
    tooltip: {
      trigger: 'item',
      formatter: (p: { data: [number, number, string] }) => `${p.data[2]}<br>actual − fitted: ${withUnit(p.data[1])}`,
    },
    grid: { left: 72, right: 16, top: 40, bottom: 56 },
    xAxis: { type: 'category', data: seasons, axisLabel: { ...TEXT, rotate: 45 }, boundaryGap: true },
    yAxis: { ...valueAxis, scale: false, ...axisName(`Actual − fitted${unit ? `, ${unit}` : ''}`), nameGap: 60 },
    series: [
      {
        name: 'Farm in a season',
        type: 'scatter',
        symbolSize: 6,
        data: points.filter((p) => index.has(p.season)).map((p) => [index.get(p.season)!, p.residual, p.label]),
        color: CHART_COLOURS.second,
        itemStyle: { opacity: 0.6 },
        markLine: { silent: true, symbol: 'none', data: [{ yAxis: 0 }], lineStyle: { color: CHART_COLOURS.error, type: 'solid', width: 2 }, label: { show: false } },
      },
    ],
  };
}

/** One netput against one price, the other prices, land and trend at their sample means. */
export function responseOption(prices: number[], quantities: number[], priceLabel: string, quantityLabel: string, meanPrice: number): EChartsCoreOption {
  return {
    ...base,
    grid: { left: 72, right: 24, top: 40, bottom: 48 },
    xAxis: { ...valueAxis, ...axisName(priceLabel), nameGap: 28 },
    yAxis: { ...valueAxis, ...axisName(quantityLabel), nameGap: 60 },
    tooltip: { trigger: 'axis', formatter: (ps: { data: [number, number] }[]) => `price ${formatAmount(ps[0]?.data[0])}: ${formatAmount(ps[0]?.data[1])}` },
    series: [
      {
        name: 'Model response',
        type: 'line',
        data: prices.map((p, k) => [p, quantities[k]]),
        symbol: 'none',
        lineStyle: { width: 3 },
        color: CHART_COLOURS.model,
        markLine: {
          silent: true,
          symbol: 'none',
          data: [{ xAxis: meanPrice }],
          lineStyle: { color: CHART_COLOURS.axis, type: 'dotted' },
          label: { formatter: 'sample mean', color: TEXT.color, position: 'insideEndBottom' },
        },
      },
    ],
  };
}

/** Back-test error by item: mean absolute percentage error and bias, in %. */
export function backtestOption(items: string[], mape: number[], bias: number[]): EChartsCoreOption {
  return {
    ...base,
    grid: { left: 56, right: 16, top: 40, bottom: 72 },
    xAxis: { type: 'category', data: items, axisLabel: { ...TEXT, rotate: 30, interval: 0 }, axisLine: { lineStyle: { color: CHART_COLOURS.axis } } },
    yAxis: { ...valueAxis, scale: false, axisLabel: { ...TEXT, formatter: (v: number) => `${v} %` } },
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => (typeof v === 'number' ? `${v.toFixed(1)} %` : String(v)) },
    series: [
      { name: 'Mean absolute error (%)', type: 'bar', data: mape, color: CHART_COLOURS.error },
      { name: 'Bias (%)', type: 'bar', data: bias, color: CHART_COLOURS.second },
    ],
  };
}
