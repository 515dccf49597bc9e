import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideCharts } from '../shared/charts';
import { FanChart, fanChartDescription, fanChartOption, fanInputFor, fanWindow, type FanChartInput } from './fan-chart';
import type { ItemProjection } from './outlook-api-types';

// Invented figures: the mapping from a projection to chart series is under test, not the numbers.
interface Series {
  id: string;
  name: string;
  type: string;
  stack?: string;
  data: (number | null)[];
  areaStyle?: unknown;
  lineStyle?: { opacity?: number; type?: string };
}

const input: FanChartInput = {
  itemName: 'Wheat',
  unit: 't',
  history: { seasons: ['2022/23', '2023/24', '2024/25', '2025/26'], values: [28_000, 30_500, 29_250, 31_000] },
  season: '2026/27',
  scenarios: [
    { name: 'low', label: 'Low scenario', q: { point: 29_000, median: 29_100, p5: 26_000, p95: 32_000 } },
    { name: 'base', label: 'Base scenario', q: { point: 31_500, median: 31_400, p5: 28_500, p95: 34_600 } },
    { name: 'high', label: 'High scenario', q: { point: 33_800, median: 33_700, p5: 30_400, p95: 37_000 } },
  ],
};

const seriesOf = (i: FanChartInput) => fanChartOption(i)['series'] as Series[];
const byId = (i: FanChartInput, id: string) => seriesOf(i).find((s) => s.id === id)!;

describe('fanChartOption', () => {
  it('should give one category per recorded season and the outlook season last', () => {
    const option = fanChartOption(input);

    expect((option['xAxis'] as { data: string[] }).data).toEqual(['2022/23', '2023/24', '2024/25', '2025/26', '2026/27']);
    expect((option['yAxis'] as { name: string }).name).toBe('t');
  });

  it("should always label the outlook season on the time axis, counting the labelled seasons back from it", () => {
    const long: FanChartInput = { ...input, history: { seasons: Array.from({ length: 20 }, (_, k) => `${2006 + k}/${String((7 + k) % 100).padStart(2, '0')}`), values: Array(20).fill(1000) } };
    const interval = ((fanChartOption(long)['xAxis'] as { axisLabel: { interval: (i: number) => boolean } }).axisLabel.interval);
    const shown = Array.from({ length: 21 }, (_, i) => i).filter(interval);

    expect(shown.at(-1)).toBe(20);
    expect(shown).toEqual([2, 5, 8, 11, 14, 17, 20]);
  });

  it('should draw the recorded quantities as a line that stops before the outlook season', () => {
    expect(byId(input, 'recorded').data).toEqual([28_000, 30_500, 29_250, 31_000, null]);
  });

  it('should open each fan at the last recorded season and widen it to the 5–95 % band', () => {
    const p5 = byId(input, 'base-p5');
    const band = byId(input, 'base-band');
    const median = byId(input, 'base-median');

    expect(p5.data).toEqual([null, null, null, 31_000, 28_500]);
    // Stacked on the 5 % series, the band's height is p95 − p5, so its top edge lies at the 95 % point.
    expect(band.data).toEqual([null, null, null, 0, 34_600 - 28_500]);
    expect(p5.stack).toBe('fan-base');
    expect(band.stack).toBe('fan-base');
    expect(band.areaStyle).toBeDefined();
    expect(p5.areaStyle).toBeUndefined();
    expect(p5.lineStyle?.opacity).toBe(0);
    expect(median.data).toEqual([null, null, null, 31_000, 31_400]);
    expect(median.lineStyle?.type).toBe('dashed');
    expect(median.stack).toBeUndefined();
  });

  it('should give the three series of a scenario one name, so one legend entry shows or hides the fan', () => {
    const option = fanChartOption(input);
    const names = seriesOf(input).map((s) => s.name);

    expect((option['legend'] as { data: string[] }).data).toEqual(['Recorded', 'Low scenario', 'Base scenario', 'High scenario']);
    expect(names.filter((n) => n === 'High scenario')).toHaveLength(3);
    expect(seriesOf(input)).toHaveLength(1 + 3 * 3);
    // Each scenario stacks on its own, never on another's band.
    expect(new Set(seriesOf(input).map((s) => s.stack).filter(Boolean))).toEqual(new Set(['fan-low', 'fan-base', 'fan-high']));
  });

  it('should open the fan at the latest season that has a record when the last one has none, widening across the gap', () => {
    const gap: FanChartInput = { ...input, history: { seasons: input.history.seasons, values: [28_000, 30_500, 29_250, null] } };

    expect(fanWindow(gap).anchor).toBe(2);
    // Halfway between the last record and the outlook season: halfway along the 5 % point and the band's width,
    // so no stacked point is empty and the band never falls to the axis.
    expect(byId(gap, 'base-p5').data).toEqual([null, null, 29_250, (29_250 + 28_500) / 2, 28_500]);
    expect(byId(gap, 'base-band').data).toEqual([null, null, 0, 6_100 / 2, 6_100]);
    expect(byId(gap, 'base-median').data).toEqual([null, null, 29_250, (29_250 + 31_400) / 2, 31_400]);
  });

  it('should start the fan at the outlook season alone when nothing was recorded', () => {
    const none: FanChartInput = { ...input, history: { seasons: ['2024/25', '2025/26'], values: [null, null] } };

    expect(fanWindow(none).anchor).toBeNull();
    expect(byId(none, 'base-median').data).toEqual([null, null, 31_400]);
  });

  it('should keep only the latest seasons when asked (a phone shows about ten)', () => {
    const option = fanChartOption({ ...input, maxHistory: 2, compact: true });

    expect((option['xAxis'] as { data: string[] }).data).toEqual(['2024/25', '2025/26', '2026/27']);
    expect(byId({ ...input, maxHistory: 2 }, 'recorded').data).toEqual([29_250, 31_000, null]);
    expect(option['legend']).toMatchObject({ bottom: 0 });
  });

  it('should explain a season in the tooltip: the record, or each scenario median with its band', () => {
    const formatter = (fanChartOption(input)['tooltip'] as { formatter: (p: unknown) => string }).formatter;

    expect(formatter([{ dataIndex: 1 }])).toBe('<strong>2023/24</strong><br>Recorded: 30,500 t');
    const last = formatter([{ dataIndex: 4 }]);
    expect(last).toContain('<strong>2026/27</strong>');
    expect(last).toContain('Base scenario: median 31,400 t (5–95 %: 28,500–34,600)');
    expect(last).toContain('Low scenario: median 29,100 t (5–95 %: 26,000–32,000)');
  });

  it('should describe the chart in words for screen readers', () => {
    expect(fanChartDescription({ ...input, scenarios: [input.scenarios[1]!] })).toBe(
      'Wheat in t: recorded 2022/23 to 2025/26; 2026/27 base scenario median 31,400 (5–95 %: 28,500–34,600)',
    );
  });
});

describe('fanInputFor', () => {
  const item: ItemProjection = {
    item: 'nitrogen',
    name: 'Nitrogen (N)',
    role: 'input',
    unit: 'kg N',
    scenarios: {
      high: { point: 58_000, mean: 58_100, sd: 3_000, median: 58_050, p5: 53_000, p95: 63_000 },
      base: { point: 61_000, mean: 61_100, sd: 3_100, median: 61_050, p5: 56_000, p95: 66_200 },
      low: { point: 64_000, mean: 64_100, sd: 3_200, median: 64_050, p5: 58_800, p95: 69_400 },
    },
    tonnes: null,
  };

  it("should take the item's own history and order the scenarios low, base, high", () => {
    const fan = fanInputFor(item, { seasons: ['2024/25', '2025/26'], items: { nitrogen: [60_000, 62_500], wheat: [1, 2] } }, '2026/27');

    expect(fan.history.values).toEqual([60_000, 62_500]);
    expect(fan.scenarios.map((s) => [s.name, s.label, s.q.median])).toEqual([
      ['low', 'Low scenario', 64_050],
      ['base', 'Base scenario', 61_050],
      ['high', 'High scenario', 58_050],
    ]);
    expect(fan.unit).toBe('kg N');
  });
});

describe('FanChart', () => {
  it('should draw the chart as SVG with the band areas and the lines', async () => {
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), provideCharts()],
    });
    const fixture = TestBed.createComponent(FanChart);
    const host = fixture.nativeElement as HTMLElement;
    const chartEl = () => host.querySelector('.chart') as HTMLElement;
    fixture.componentRef.setInput('data', input);
    fixture.detectChanges();
    // jsdom has no layout: give the container a size ECharts can read.
    Object.defineProperty(chartEl(), 'clientWidth', { value: 640, configurable: true });
    Object.defineProperty(chartEl(), 'clientHeight', { value: 300, configurable: true });
    await fixture.whenStable();

    await vi.waitFor(() => expect(host.querySelector('svg path')).not.toBeNull(), { timeout: 5000 });
    expect(host.querySelector('figcaption')?.textContent).toContain('Wheat');
    expect(chartEl().getAttribute('aria-label')).toContain('2026/27 low scenario median 29,100');
    expect(host.querySelectorAll('svg path').length).toBeGreaterThan(6);
  });
});
