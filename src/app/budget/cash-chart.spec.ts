import { cashChartOption } from './cash-chart';
import type { CashMonth } from './budget-api-types';

/** A month of the cash schedule (invented figures: the mapping is under test, not the money). */
function month(m: string, prepaid: number, onTerms: number, cumulative: number, bookedTonnes = 0): CashMonth {
  return { month: m, bookedTonnes, bookedValue: 0, prepaid, onTerms, cash: prepaid + onTerms, cumulative };
}

interface Series {
  name: string;
  type: string;
  stack?: string;
  yAxisIndex?: number;
  data: (number | null)[];
}

const base: CashMonth[] = [
  month('2026-08', 40_000, 0, 40_000, 80),
  month('2026-09', 0, 0, 40_000),
  month('2026-10', 38_000, 0, 78_000, 80),
  month('2027-03', 0, 20_500, 98_500),
];

describe('cashChartOption', () => {
  it('should give one category per month of the schedule, in order, in words', () => {
    const option = cashChartOption({ scenario: 'Base', months: base, currency: 'EUR' });

    expect((option['xAxis'] as { data: string[] }).data).toEqual(['Aug 2026', 'Sep 2026', 'Oct 2026', 'Mar 2027']);
  });

  it('should stack prepaid and on-terms cash as bars and draw the running total on the second axis', () => {
    const series = cashChartOption({ scenario: 'Base', months: base, currency: 'EUR' })['series'] as Series[];

    expect(series.map((s) => [s.name, s.type, s.stack ?? null, s.yAxisIndex ?? 0])).toEqual([
      ['Prepaid at booking', 'bar', 'cash', 0],
      ['Paid on terms', 'bar', 'cash', 0],
      ['Cumulative, Base', 'line', null, 1],
    ]);
    expect(series[0]!.data).toEqual([40_000, 0, 38_000, 0]);
    expect(series[1]!.data).toEqual([0, 0, 0, 20_500]);
    expect(series[2]!.data).toEqual([40_000, 40_000, 78_000, 98_500]);
  });

  it('should line up another scenario by month, leaving a gap where it has none', () => {
    const up: CashMonth[] = [month('2026-08', 44_000, 0, 44_000), month('2026-10', 41_800, 0, 85_800), month('2027-03', 0, 22_550, 108_350)];
    const series = cashChartOption({ scenario: 'N +20 %', months: up, currency: 'EUR', compare: { scenario: 'Base', months: base } })['series'] as Series[];

    expect(series).toHaveLength(4);
    expect(series[3]!.name).toBe('Cumulative, Base');
    expect(series[3]!.yAxisIndex).toBe(1);
    // Base has a September; the scenario's categories do not, so only its three months are drawn.
    expect(series[3]!.data).toEqual([40_000, 78_000, 98_500]);
  });

  it('should describe the chart in words for screen readers: span, busiest month, total', () => {
    const aria = cashChartOption({ scenario: 'Base', months: base, currency: 'EUR' })['aria'] as { label: { description: string } };

    expect(aria.label.description).toBe('Cash by month, Base, Aug 2026 to Mar 2027; most in Aug 2026: EUR 40,000; EUR 98,500 in all');
  });

  it('should name the currency on both value axes', () => {
    const yAxis = cashChartOption({ scenario: 'Base', months: base, currency: 'USD' })['yAxis'] as { name: string }[];

    expect(yAxis.map((a) => a.name)).toEqual(['USD per month', 'USD cumulative']);
  });
});
