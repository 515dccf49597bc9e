import { day, kg, money, month, nutrientLine, pct, perHa, tonnes } from './booking-format';

describe('booking figures in words', () => {
  it('formats minor units, rates, dates and nutrients', () => {
    expect(money(277_874, 'EUR')).toBe('EUR 2,778.74');
    expect(money(-5, 'EUR')).toBe('−EUR 0.05');
    expect(pct(250)).toBe('2.5 %');
    expect(pct(2000)).toBe('20 %');
    expect(day('2099-01-31')).toBe('31 Jan 2099');
    expect(month('2027-03')).toBe('March 2027');
    expect(tonnes(12_345)).toBe('12.345');
    expect(kg(2300.4)).toBe('2,300');
    expect(nutrientLine({ nitrogen: 2300, phosphate: 0, potash: 1500 })).toBe('N 2,300 · P2O5 0 · K2O 1,500 kg');
    expect(perHa({ nitrogen: 2300, phosphate: 0, potash: 0 }, 50)).toBe('N 46 · P2O5 0 · K2O 0 kg/ha');
    expect(perHa({ nitrogen: 1, phosphate: 0, potash: 0 }, 0)).toBe('');
  });
});
