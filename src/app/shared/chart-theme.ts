import { COLOUR, FONT, RADIUS, SERIES, TYPE } from '../../../shared/design-tokens';

/** The name every chart of the app draws with (registered in echarts-setup.ts, handed to ngx-echarts in charts.ts). */
export const CHART_THEME = 'netput';

const text = { color: COLOUR.loamSoft, fontFamily: FONT.text, fontSize: TYPE.small };

const axis = {
  axisLine: { show: true, lineStyle: { color: COLOUR.loamSoft, width: 1 } },
  axisTick: { show: true, length: 4, lineStyle: { color: COLOUR.loamSoft } },
  axisLabel: { ...text },
  nameTextStyle: { ...text, color: COLOUR.loam, fontWeight: 600 },
  splitLine: { show: true, lineStyle: { color: COLOUR.furrow, type: [2, 4] } },
  splitArea: { show: false },
};

/**
 * Netput's chart theme, from shared/design-tokens.ts: the earth series palette on the sheet colour,
 * the text face for every label, dotted furrow grid lines, axes drawn in soft loam with short ticks,
 * square-ended bars, round line markers and a tooltip that reads like a note card (straw paper, a
 * field-green edge). Charts add their own units to the tooltip's figures.
 */
export const chartTheme = {
  color: [...SERIES],
  backgroundColor: 'transparent',
  textStyle: { fontFamily: FONT.text, color: COLOUR.loam },
  title: { textStyle: { fontFamily: FONT.heading, color: COLOUR.fieldDeep, fontWeight: 600 }, subtextStyle: text },
  legend: {
    textStyle: { ...text, color: COLOUR.loam },
    icon: 'roundRect',
    itemWidth: 18,
    itemHeight: 6,
    itemGap: 16,
    inactiveColor: COLOUR.furrow,
  },
  tooltip: {
    backgroundColor: COLOUR.paper,
    borderColor: COLOUR.field,
    borderWidth: 1,
    padding: [6, 10],
    textStyle: { fontFamily: FONT.text, color: COLOUR.loam, fontSize: TYPE.small },
    extraCssText: `border-radius:${RADIUS.control}px;border-left-width:4px;box-shadow:0 2px 6px rgba(30,27,20,0.16);font-variant-numeric:tabular-nums;`,
    axisPointer: {
      lineStyle: { color: COLOUR.grain, width: 1, type: 'solid' },
      crossStyle: { color: COLOUR.grain },
      shadowStyle: { color: 'rgba(162, 107, 31, 0.08)' },
    },
  },
  categoryAxis: { ...axis, splitLine: { show: false } },
  valueAxis: { ...axis, axisLine: { show: false }, axisTick: { show: false } },
  timeAxis: axis,
  logAxis: axis,
  line: { symbol: 'circle', symbolSize: 6, lineStyle: { width: 2 }, smooth: false },
  scatter: { symbol: 'circle', symbolSize: 6, itemStyle: { opacity: 0.75 } },
  bar: { itemStyle: { borderRadius: [2, 2, 0, 0] }, barMaxWidth: 40 },
  markLine: { lineStyle: { color: COLOUR.loamSoft } },
  dataZoom: {
    borderColor: COLOUR.furrow,
    fillerColor: 'rgba(81, 101, 40, 0.12)',
    handleStyle: { color: COLOUR.card, borderColor: COLOUR.field },
    moveHandleStyle: { color: COLOUR.field },
    textStyle: text,
    dataBackground: { lineStyle: { color: COLOUR.field }, areaStyle: { color: COLOUR.fieldWash } },
  },
};

/** Chart text colour and face for options that style a label themselves (e.g. a mark line's label). */
export const CHART_TEXT = { color: COLOUR.loamSoft, fontFamily: FONT.text } as const;
