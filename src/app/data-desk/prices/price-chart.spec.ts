import type { PriceSeries } from '../../../../shared/api-types';
import { formatAxis, formatPrice, panelsOf, priceChartOption } from './price-chart';

const data: PriceSeries = {
  deflator: null,
  seasons: ['2023/24', '2024/25'],
  series: [
    { itemCode: 'wheat', itemName: 'Wheat', unit: 't', currency: 'EUR', values: [205.9, 221.75] },
    { itemCode: 'nitrogen', itemName: 'Nitrogen (N)', unit: 'kg N', currency: 'EUR', values: [1.1, null] },
    { itemCode: 'canola', itemName: 'Canola', unit: 't', currency: 'EUR', values: [430, 510.1] },
  ],
};

describe('price chart', () => {
  it('should put items of the same unit on one axis and other units on panels of their own', () => {
    expect(panelsOf(data).map((p) => [p.axisName, p.series.map((s) => s.itemCode)])).toEqual([
      ['EUR/t', ['wheat', 'canola']],
      ['EUR/kg N', ['nitrogen']],
    ]);
    const deflated = panelsOf({ ...data, deflator: { name: 'Consumer prices', base: '2016/17 = 100' } });
    expect(deflated[0].axisName).toBe('EUR/t, real (2016/17 = 100)');
  });

  it('should draw each series on its panel, keeping a season without a price as a gap', () => {
    const option = priceChartOption(data) as { series: { name: string; xAxisIndex: number; data: (number | null)[]; connectNulls: boolean }[]; grid: unknown[] };
    expect(option.grid).toHaveLength(2);
    expect(option.series.map((s) => [s.name, s.xAxisIndex])).toEqual([
      ['Wheat', 0],
      ['Canola', 0],
      ['Nitrogen (N)', 1],
    ]);
    expect(option.series[2].data).toEqual([1.1, null]);
    expect(option.series.every((s) => s.connectNulls === false)).toBe(true);
  });

  it('should show prices with sensible precision', () => {
    expect(formatPrice(221.75)).toBe('221.75');
    expect(formatPrice(1.1)).toBe('1.100');
    expect(formatAxis(700)).toBe('700');
    expect(formatAxis(2.5)).toBe('2.5');
  });
});
