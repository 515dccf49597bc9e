import { describe, expect, it } from 'vitest';
import { guessDelimiter, parseCurrency, parseDecimal, parseNumber, parseIsoDate, parseSeason, unescapeFormula, type SeasonRef } from './cell-parsers.js';
import { headerParts, normalUnit, sameUnit } from './unit-names.js';

describe('parseNumber', () => {
  const otherMark = (s: string, other: string, mine: string) =>
    `"${s}" is written with ${other}, but this co-op writes numbers with ${mine}; it was not read (the decimal mark is a co-op setting, and an import can choose its own)`;
  const POINT = 'a decimal point (1234.5)';
  const COMMA = 'a decimal comma (1234,5)';

  it('reads plain decimals with a point, a sign and an exponent under a point', () => {
    expect(parseNumber('1234.5', 'point')).toEqual({ ok: true, value: 1234.5 });
    expect(parseNumber(' -0.25 ', 'point')).toEqual({ ok: true, value: -0.25 });
    expect(parseNumber('.5', 'point')).toEqual({ ok: true, value: 0.5 });
    expect(parseNumber('1e3', 'point')).toEqual({ ok: true, value: 1000 });
    expect(parseNumber('+7', 'point')).toEqual({ ok: true, value: 7 });
    expect(parseDecimal('1234.5')).toEqual({ ok: true, value: 1234.5 });
  });

  it('reads decimal commas under a comma', () => {
    expect(parseNumber('204,5', 'comma')).toEqual({ ok: true, value: 204.5 });
    expect(parseNumber('-0,25', 'comma')).toEqual({ ok: true, value: -0.25 });
    expect(parseNumber('1,5e3', 'comma')).toEqual({ ok: true, value: 1500 });
    expect(parseNumber('1214', 'comma')).toEqual({ ok: true, value: 1214 });
  });

  it('reads thousands grouped by spaces, or by the convention\'s own separator before a decimal part', () => {
    expect(parseNumber('1 234 567,5', 'comma')).toEqual({ ok: true, value: 1234567.5 });
    expect(parseNumber('1\u00a0234.5', 'point')).toEqual({ ok: true, value: 1234.5 });
    expect(parseNumber('1.234,5', 'comma')).toEqual({ ok: true, value: 1234.5 });
    expect(parseNumber('1,234.5', 'point')).toEqual({ ok: true, value: 1234.5 });
  });

  it('refuses "204,5" under a point instead of reading 2045 (issue 15)', () => {
    expect(parseNumber('204,5', 'point')).toEqual({ ok: false, message: otherMark('204,5', COMMA, POINT) });
    expect(parseDecimal('12,5')).toEqual({ ok: false, message: otherMark('12,5', COMMA, POINT) });
  });

  it('refuses "2O4,5" with a letter O instead of reading 245 (issue 15), under either mark', () => {
    for (const mark of ['point', 'comma'] as const) {
      expect(parseNumber('2O4,5', mark)).toEqual({ ok: false, message: '"2O4,5" is not a number: it has the letter "O" in it' });
    }
  });

  it('refuses "1.234,5" under a point and "1,234.5" under a comma (issue 15)', () => {
    expect(parseNumber('1.234,5', 'point')).toEqual({ ok: false, message: otherMark('1.234,5', COMMA, POINT) });
    expect(parseNumber('1,234.5', 'comma')).toEqual({ ok: false, message: otherMark('1,234.5', POINT, COMMA) });
    expect(parseNumber('204.5', 'comma')).toEqual({ ok: false, message: otherMark('204.5', POINT, COMMA) });
  });

  it('refuses thousands grouped by the convention\'s separator with no decimals, which the other convention reads as decimals', () => {
    expect(parseNumber('1,234', 'point')).toEqual({ ok: false, message: '"1,234" is ambiguous: with a decimal point (1234.5) write thousands without commas (1234), so they cannot be misread as decimals' });
    expect(parseNumber('1.234', 'comma')).toEqual({ ok: false, message: '"1.234" is ambiguous: with a decimal comma (1234,5) write thousands without points (1234), so they cannot be misread as decimals' });
  });

  it('names text that is not a number', () => {
    expect(parseNumber('12,5x', 'comma')).toEqual({ ok: false, message: '"12,5x" is not a number: it has the letter "x" in it' });
    expect(parseNumber('€195', 'point')).toEqual({ ok: false, message: '"€195" is not a number: it has the character "€" in it' });
    expect(parseNumber('NaN', 'point')).toEqual({ ok: false, message: '"NaN" is not a number: it has the letter "N" in it' });
    expect(parseNumber("1'234.5", 'point')).toEqual({ ok: false, message: '"1\'234.5" is not a clean number: write it with a decimal point (1234.5) and no thousands separators' });
    expect(parseNumber('1e999', 'point')).toEqual({ ok: false, message: '"1e999" is too large' });
    expect(parseNumber('', 'comma')).toEqual({ ok: false, message: 'empty cell' });
  });
});

describe('parseIsoDate', () => {
  it('reads YYYY-MM-DD and checks the calendar', () => {
    expect(parseIsoDate('2024-02-29')).toEqual({ ok: true, value: '2024-02-29' });
    // 2023 is not a leap year (Gregorian rule).
    expect(parseIsoDate('2023-02-29')).toEqual({ ok: false, message: '"2023-02-29" is not a date in the calendar' });
  });

  it('reads a day and month that cannot be swapped: 14/08/2026 is the 14th of August in either order (issue 15)', () => {
    expect(parseIsoDate('14/08/2026')).toEqual({ ok: true, value: '2026-08-14' });
    expect(parseIsoDate('08/14/2026')).toEqual({ ok: true, value: '2026-08-14' });
    expect(parseIsoDate('14.8.2026')).toEqual({ ok: true, value: '2026-08-14' });
    expect(parseIsoDate('05/05/2026')).toEqual({ ok: true, value: '2026-05-05' });
    expect(parseIsoDate('31/02/2026')).toEqual({ ok: false, message: '"31/02/2026" is not a date in the calendar' });
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

describe('guessDelimiter', () => {
  it('takes the header line: a semicolon file with decimal commas is semicolon separated (issue 15)', () => {
    expect(guessDelimiter('item;season;price\nwheat;2024/25;204,5\nwheat;2024/25;1,2\n')).toBe(';');
    expect(guessDelimiter('\n\nitem,season,"a;b"\nwheat,2024/25,1')).toBe(',');
    expect(guessDelimiter('item\tseason\nwheat\t2024')).toBe('\t');
    expect(guessDelimiter('price\n204,5')).toBeNull();
  });
});
