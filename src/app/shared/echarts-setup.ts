// The one place ECharts is assembled from its parts, shared by every chart of the app and by the
// specs (stack notes, gotcha 8). Charts load it lazily:
//   providers: [provideEchartsCore({ echarts: () => import('../shared/echarts-setup').then((m) => m.echarts) })]
// and draw with `[initOpts]="{ renderer: 'svg' }"`. Add the chart types and components you need
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

export { echarts };
