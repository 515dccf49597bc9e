import { describe, expect, it } from 'vitest';
import { parseCurrency, parseDecimal, parseIsoDate, parseSeason, unescapeFormula, type SeasonRef } from './cell-parsers.js';
import { headerParts, normalUnit, sameUnit } from './unit-names.js';

describe('parseDecimal', () => {
  it('reads plain decimals with a point, a sign and an exponent', () => {
    expect(parseDecimal('1234.5')).toEqual({ ok: true, value: 1234.5 });
    expect(parseDecimal(' -0.25 ')).toEqual({ ok: true, value: -0.25 });
    expect(parseDecimal('.5')).toEqual({ ok: true, value: 0.5 });
    expect(parseDecimal('1e3')).toEqual({ ok: true, value: 1000 });
    expect(parseDecimal('+7')).toEqual({ ok: true, value: 7 });
  });

  it('refuses a decimal comma and says how to write it', () => {
    expect(parseDecimal('12,5')).toEqual({ ok: false, message: '"12,5" uses a comma for decimals: write 12.5' });
  });

  it('refuses thousands separators as ambiguous', () => {
    const ambiguous = 'is ambiguous: write numbers with a point for decimals and no thousands separators (e.g. 1234.5)';
    expect(parseDecimal('1 234,5')).toEqual({ ok: false, message: `"1 234,5" ${ambiguous}` });
    // 1,234 is 1234 in one convention and 1.234 in another.
    expect(parseDecimal('1,234')).toEqual({ ok: false, message: `"1,234" ${ambiguous}` });
    expect(parseDecimal('1.234.567')).toEqual({ ok: false, message: `"1.234.567" ${ambiguous}` });
    expect(parseDecimal("1'234.5")).toEqual({ ok: false, message: `"1'234.5" ${ambiguous}` });
  });

  it('names text that is not a number', () => {
    expect(parseDecimal('12,5x')).toEqual({ ok: false, message: '"12,5x" is not a number' });
    expect(parseDecimal('€195')).toEqual({ ok: false, message: '"€195" is not a number' });
    expect(parseDecimal('NaN')).toEqual({ ok: false, message: '"NaN" is not a number' });
    expect(parseDecimal('Infinity')).toEqual({ ok: false, message: '"Infinity" is not a number' });
    expect(parseDecimal('1e999')).toEqual({ ok: false, message: '"1e999" is too large' });
    expect(parseDecimal('')).toEqual({ ok: false, message: 'empty cell' });
  });
});

describe('parseIsoDate', () => {
  it('reads YYYY-MM-DD and checks the calendar', () => {
    expect(parseIsoDate('2024-02-29')).toEqual({ ok: true, value: '2024-02-29' });
    // 2023 is not a leap year (Gregorian rule).
    expect(parseIsoDate('2023-02-29')).toEqual({ ok: false, message: '"2023-02-29" is not a date in the calendar' });
  });

  it('refuses day/month orders as ambiguous and suggests the ISO spelling where it can', () => {
    expect(parseIsoDate('03/04/2024')).toEqual({ ok: false, message: '"03/04/2024" is ambiguous (day/month or month/day?): write dates as YYYY-MM-DD' });
    expect(parseIsoDate('2024/3/4')).toEqual({ ok: false, message: '"2024/3/4": write dates as YYYY-MM-DD (2024-03-04)' });
    expect(parseIsoDate('soon')).toEqual({ ok: false, message: '"soon" is not a date: write dates as YYYY-MM-DD' });
  });
});

describe('parseSeason', () => {
  const seasons: SeasonRef[] = [
    { id: 1, label: '2014/15', startYear: 2014 },
    { id: 2, label: '2015/16', startYear: 2015 },
  ];
  const byLabel = new Map(seasons.map((s) => [s.label, s]));
  const byYear = new Map(seasons.map((s) => [s.startYear, s]));
  const p = (s: string) => parseSeason(s, seasons, byLabel, byYear);

  it('accepts the label, the first year, and the long spellings', () => {
    for (const s of ['2014/15', '2014', '2014-15', '2014/2015', ' 2014 / 15 ']) expect(p(s)).toEqual({ ok: true, value: seasons[0] });
  });

  it('refuses a second year that does not follow the first', () => {
    expect(p('2014/16')).toEqual({ ok: false, message: '"2014/16" is not a season: the second year must follow the first (2014/15)' });
  });

  it('names an unknown season and the range that exists', () => {
    expect(p('2030/31')).toEqual({ ok: false, message: 'unknown season "2030/31" (seasons run from 2014/15 to 2015/16)' });
    expect(p('spring')).toEqual({ ok: false, message: '"spring" is not a season: write it as 2014/15 or 2014' });
  });
});

describe('parseCurrency', () => {
  it('accepts three letters and upper-cases them', () => {
    expect(parseCurrency('eur')).toEqual({ ok: true, value: 'EUR' });
    expect(parseCurrency('EURO')).toEqual({ ok: false, message: '"EURO" is not a currency code: use three letters such as EUR' });
  });
});

describe('unescapeFormula', () => {
  it('drops the apostrophe our exports put before formula characters, and nothing else', () => {
    expect(unescapeFormula("'=SUM(A1:A2)")).toBe('=SUM(A1:A2)');
    expect(unescapeFormula("'-3")).toBe('-3');
    expect(unescapeFormula("'tis")).toBe("'tis");
    expect(unescapeFormula('plain')).toBe('plain');
  });
});

describe('units', () => {
  it('compares units ignoring case, spaces and a few spelled-out names', () => {
    expect(sameUnit('kg N', 'kgN')).toBe(true);
    expect(sameUnit('tonnes', 't')).toBe(true);
    expect(sameUnit('litres', 'L')).toBe(true);
    expect(sameUnit('per t', 't')).toBe(true);
    // Product kilograms are not nutrient kilograms.
    expect(sameUnit('kg', 'kg N')).toBe(false);
    expect(normalUnit(' Kg  P2O5 ')).toBe('kgp2o5');
  });

  it('splits a header into its base, currency and unit', () => {
    expect(headerParts('Price (EUR/t)')).toEqual({ base: 'Price', currency: 'EUR', unit: 't' });
    expect(headerParts('quantity [kg N]')).toEqual({ base: 'quantity', currency: null, unit: 'kg N' });
    expect(headerParts('price (per t)')).toEqual({ base: 'price', currency: null, unit: 't' });
    expect(headerParts('price (€/t)')).toEqual({ base: 'price', currency: null, unit: 't' });
    expect(headerParts('price')).toEqual({ base: 'price', currency: null, unit: null });
  });
});
