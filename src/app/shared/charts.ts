import { provideEchartsCore } from 'ngx-echarts';
import { CHART_THEME } from './chart-theme';

/**
 * The chart providers of every feature that draws charts: ECharts loaded lazily from
 * echarts-setup.ts (which also registers Netput's theme) and that theme as every chart's default.
 */
export function provideCharts() {
  return provideEchartsCore({ echarts: () => import('./echarts-setup').then((m) => m.echarts), theme: CHART_THEME });
}
