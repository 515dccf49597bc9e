// The one place ECharts is assembled from its parts and Netput's chart theme is registered, shared by
// every chart of the app and by the specs (stack notes, gotcha 8). Features load it lazily with
//   providers: [provideCharts()]   (src/app/shared/charts.ts, which also makes the theme the default)
// and charts draw with `[initOpts]="{ renderer: 'svg' }"`. Add the chart types and components you need
// below (one list, kept sorted), never a second `echarts.use` elsewhere.
import { BarChart, LineChart, ScatterChart } from 'echarts/charts';
import {
  DataZoomComponent,
  GridComponent,
  LegendComponent,
  MarkLineComponent,
  TitleComponent,
  TooltipComponent,
} from 'echarts/components';
import * as echarts from 'echarts/core';
import { SVGRenderer } from 'echarts/renderers';
import { CHART_THEME, chartTheme } from './chart-theme';

echarts.use([
  // charts
  BarChart,
  LineChart,
  ScatterChart,
  // components (no AriaComponent: each chart's container carries its own role=img and aria-label,
  // which the aria option would overwrite with a generic description)
  DataZoomComponent,
  GridComponent,
  LegendComponent,
  MarkLineComponent,
  TitleComponent,
  TooltipComponent,
  // renderer: SVG only (inspectable in the DOM, works in jsdom)
  SVGRenderer,
]);

echarts.registerTheme(CHART_THEME, chartTheme);

export { echarts };
