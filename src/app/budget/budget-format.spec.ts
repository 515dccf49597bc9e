import { formatLot, formatMass, formatPrice, formatPricePer } from './budget-format';

describe('budget number formatting', () => {
  it('should round one price the same way wherever it shows (reference price and prices used)', () => {
    // 1.3215 EUR/kg N, a price half-way between two third decimals: both lines read 1.322.
    expect(formatPrice(1.3215, 'EUR')).toBe('EUR 1.322');
    expect(formatPricePer(1.3215, 'EUR', 'kg N')).toBe('EUR 1.322/kg N');
    expect(formatPricePer(0.6685, 'EUR', 'kg K2O')).toBe('EUR 0.669/kg K2O');
    expect(formatPricePer(212.1, 'EUR', 't')).toBe('EUR 212.10/t');
    expect(formatPricePer(25.86, 'EUR', '')).toBe('EUR 25.86');
    expect(formatPricePer(null, 'EUR', 't')).toBe('—');
  });

  it('should show large nutrient masses to four significant figures and small ones whole', () => {
    expect(formatMass(1_423_282)).toBe('1,423,000');
    expect(formatMass(80_385)).toBe('80,390');
    expect(formatMass(17_016)).toBe('17,020');
    expect(formatMass(9_876.4)).toBe('9,876');
    expect(formatMass(-12_345.6)).toBe('−12,350');
    expect(formatMass(0)).toBe('0');
  });

  it('should show a lot size to at most 0.01 (25 t is 27.56 short tons)', () => {
    // 1 short ton = 907.18474 kg exactly (NIST Handbook 44, Appendix C; docs/sources.md §6).
    expect(formatLot(25_000 / 907.18474)).toBe('27.56');
    expect(formatLot(25)).toBe('25');
    expect(formatLot(22.5)).toBe('22.5');
  });
});
