import { describe, expect, it } from 'vitest';
import {
  bandAround,
  computeExpectation,
  errorHistory,
  ExpectationError,
  expectationAt,
  fmtPct,
  fmtPrice,
  scenarioPrices,
  type FuturesBySeason,
  type PricePoint,
} from './expectations.js';

const series = (start: number, prices: number[]): PricePoint[] => prices.map((price, k) => ({ season: `${start + k}/${String((start + k + 1) % 100).padStart(2, '0')}`, year: start + k, price }));
const none: FuturesBySeason = new Map();
const at = (method: Parameters<typeof expectationAt>[0], history: PricePoint[], year: number, futures = none) =>
  expectationAt(method, history, { season: `${year}/xx`, year }, futures, 'EUR/t').value;

describe('expectation rules (docs/forecasting.md §1; values worked by hand)', () => {
  const h = series(2016, [100, 110, 120]);

  it('last season, moving average and Olympic average follow their definitions', () => {
    expect(at({ kind: 'last' }, h, 2019)).toBe(120);
    expect(at({ kind: 'moving-average', k: 3 }, h, 2019)).toBeCloseTo(110, 12); // (100+110+120)/3
    expect(at({ kind: 'moving-average', k: 2 }, h, 2019)).toBeCloseTo(115, 12);
    // Olympic average of 5: the highest (50) and lowest (10) dropped → (20+30+40)/3 = 30.
    expect(at({ kind: 'moving-average', k: 5, olympic: true }, series(2010, [10, 50, 20, 30, 40]), 2015)).toBeCloseTo(30, 12);
  });

  it('the linear trend is the least-squares line extended to the season', () => {
    // Exact line 100, 110, 120 → 130 at the next year (closed form).
    expect(at({ kind: 'trend', seasons: 10 }, h, 2019)).toBeCloseTo(130, 9);
    // x = 1,2,3; y = 1,3,2: slope Sxy/Sxx = 1/2, intercept 2 − 0.5·2 = 1, so ŷ(4) = 3 (worked by hand).
    expect(at({ kind: 'trend', seasons: 10 }, series(2001, [1, 3, 2]), 2004)).toBeCloseTo(3, 9);
    // Only the last n seasons enter the line. Worked by hand: the last 5 seasons are 2003–2007 with
    // prices 165, 180, 175, 200, 190; centred years −2..2, mean price 182, Sxy = 70, Sxx = 10, so
    // the slope is 7 and the line reads 182 + 7·3 = 203 in 2008. (The code fits the line with
    // simple-statistics, so a value from that library would check the library against itself.)
    const long = series(2000, [150, 149, 170, 165, 180, 175, 200, 190]);
    expect(at({ kind: 'trend', seasons: 5 }, long, 2008)).toBeCloseTo(203, 9);
  });

  it('adaptive expectations equal Nerlove’s closed form λ Σ (1−λ)^k p_{t−1−k} plus the start value’s weight', () => {
    // Recursion by hand: 100 → 100 + ½(110 − 100) = 105 → 105 + ½(120 − 105) = 112.5.
    expect(at({ kind: 'adaptive', lambda: 0.5 }, h, 2019)).toBeCloseTo(112.5, 12);
    const prices = [180, 210, 195, 240, 230, 205, 220];
    const lam = 0.3;
    const n = prices.length;
    let closed = (1 - lam) ** (n - 1) * prices[0]!;
    for (let k = 0; k <= n - 2; k++) closed += lam * (1 - lam) ** k * prices[n - 1 - k]!;
    expect(at({ kind: 'adaptive', lambda: lam }, series(2010, prices), 2017)).toBeCloseTo(closed, 10);
    // λ = 1 is the naive expectation.
    expect(at({ kind: 'adaptive', lambda: 1 }, series(2010, prices), 2017)).toBe(220);
  });

  it('futures plus basis: the latest quote plus the mean of cash − latest futures over the last n seasons', () => {
    const cash = series(2020, [200, 210, 190]);
    const futures: FuturesBySeason = new Map([
      [2020, { season: '2020/21', quotes: [{ contract: 'Sep', quote: 205, quotedOn: '2020-03-01' }, { contract: 'Sep', quote: 203, quotedOn: '2020-08-01' }] }],
      [2021, { season: '2021/22', quotes: [{ contract: 'Sep', quote: 214, quotedOn: '2021-08-01' }] }],
      [2022, { season: '2022/23', quotes: [{ contract: 'Sep', quote: 195, quotedOn: '2022-08-01' }] }],
      [2023, { season: '2023/24', quotes: [{ contract: 'Sep', quote: 198, quotedOn: '2022-12-01' }, { contract: 'Sep', quote: 202, quotedOn: '2023-02-01' }] }],
    ]);
    // Bases −3, −4, −5 → mean −4; latest quote 202 → 198.
    expect(at({ kind: 'futures-basis', basisSeasons: 3 }, cash, 2023, futures)).toBeCloseTo(198, 12);
    // Last two bases only: −4.5 → 197.5.
    expect(at({ kind: 'futures-basis', basisSeasons: 2 }, cash, 2023, futures)).toBeCloseTo(197.5, 12);
    // Past errors use the season's earliest quote: 2021: 214 − 3 = 211 against 210; 2022: 195 − 3.5 = 191.5 against 190.
    const e = errorHistory({ kind: 'futures-basis', basisSeasons: 3 }, cash, futures, 'EUR/t');
    expect(e.seasons.map((s) => s.season)).toEqual(['2021/22', '2022/23']);
    expect(e.seasons[0]!.expected).toBeCloseTo(211, 12);
    expect(e.seasons[0]!.errorPct).toBeCloseTo((100 * (210 - 211)) / 211, 12);
    expect(e.seasons[1]!.expected).toBeCloseTo(191.5, 12);
    expect(() => at({ kind: 'futures-basis', contract: 'Dec', basisSeasons: 3 }, cash, 2023, futures)).toThrow(/No futures quote/);
  });

  it('says what is missing when a history is too short', () => {
    expect(() => at({ kind: 'moving-average', k: 5 }, h, 2019)).toThrow(ExpectationError);
    expect(() => at({ kind: 'moving-average', k: 5 }, h, 2019)).toThrow('needs prices of at least 5 earlier seasons; 3 found before 2019/xx');
    expect(() => at({ kind: 'trend', seasons: 10 }, series(2016, [100, 110]), 2018)).toThrow(/at least 3/);
  });
});

describe('error history and bands', () => {
  it('the naive rule’s errors on a series growing 10% a season are all +10%, so the band is ±10%', () => {
    const h = series(2010, [100, 110, 121, 133.1]);
    const e = errorHistory({ kind: 'last' }, h, none, 'EUR/t');
    expect(e.seasons).toHaveLength(3);
    for (const s of e.seasons) expect(s.errorPct).toBeCloseTo(10, 10);
    expect(e.rmsPct).toBeCloseTo(10, 10);
    const c = computeExpectation({ item: 'wheat', method: { kind: 'last' } }, { history: h, target: { season: '2014/15', year: 2014 }, futures: none, priceUnit: 'EUR/t' });
    expect(c.base).toBe(133.1);
    expect(c.low).toBeCloseTo(133.1 * 0.9, 10);
    expect(c.high).toBeCloseTo(133.1 * 1.1, 10);
    expect(c.explanation).toContain('root mean square error');
  });

  it('RMS of relative errors: 10% and 9.0909…% give √((10² + 9.0909²)/2)', () => {
    const e = errorHistory({ kind: 'last' }, series(2016, [100, 110, 120]), none, 'EUR/t');
    expect(e.seasons.map((s) => s.errorPct)).toEqual([10, (100 * 10) / 110]);
    expect(e.rmsPct).toBeCloseTo(Math.sqrt((100 + (1000 / 110) ** 2) / 2), 12);
  });

  it('the error window keeps the last 10 seasons', () => {
    const e = errorHistory({ kind: 'last' }, series(2000, Array.from({ length: 20 }, (_, k) => 100 + 3 * k + (k % 3))), none, 'EUR/t');
    expect(e.seasons).toHaveLength(10);
    expect(e.seasons[0]!.season).toBe('2010/11');
  });

  it('refuses an error band without enough past errors, naming the band', () => {
    const errors = errorHistory({ kind: 'last' }, series(2016, [100, 110, 120]), none, 'EUR/t');
    try {
      bandAround(120, { kind: 'errors', k: 1 }, errors, 'EUR/t', false);
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(ExpectationError);
      expect((err as ExpectationError).field).toBe('band');
    }
    const pct = bandAround(200, { kind: 'percent', pct: 15 }, errors, 'EUR/t', false);
    expect(pct.low).toBeCloseTo(170, 10);
    expect(pct.high).toBeCloseTo(230, 10);
    expect(() => bandAround(200, { kind: 'manual', low: 210, high: 230 }, errors, 'EUR/t', false)).toThrow(/must hold/);
  });
});

describe('scenarios', () => {
  const ex = [
    { item: 'wheat', role: 'output' as const, base: 200, low: 180, high: 220 },
    { item: 'nitrogen', role: 'input' as const, base: 1.2, low: 1, high: 1.4 },
  ];
  it('margin: the low scenario pairs low output prices with high input prices', () => {
    const [low, base, high] = scenarioPrices(ex, 'margin');
    expect(low).toEqual({ name: 'low', prices: { wheat: 180, nitrogen: 1.4 } });
    expect(base).toEqual({ name: 'base', prices: { wheat: 200, nitrogen: 1.2 } });
    expect(high).toEqual({ name: 'high', prices: { wheat: 220, nitrogen: 1 } });
  });
  it('uniform: every item at its low (high) price', () => {
    const [low, , high] = scenarioPrices(ex, 'uniform');
    expect(low!.prices).toEqual({ wheat: 180, nitrogen: 1 });
    expect(high!.prices).toEqual({ wheat: 220, nitrogen: 1.4 });
  });
});

describe('numbers in the explanations read as the screens show them', () => {
  // The client's formatPrice (src/app/outlook/outlook-format.ts) is Intl.NumberFormat('en-GB') with
  // 2 decimals from 10 up and 3 below; the server must write the very same text.
  const screen = (v: number) => new Intl.NumberFormat('en-GB', { minimumFractionDigits: Math.abs(v) >= 10 ? 2 : 3, maximumFractionDigits: Math.abs(v) >= 10 ? 2 : 3 }).format(v);

  it('rounds a last digit of 5 up, as the screens do, although the binary value lies just below', () => {
    // 1.3215 is stored as 1.32149999999999989…, 0.6685 as 0.66849999999999998…: toFixed(3) gave 1.321 and 0.668.
    expect(fmtPrice(1.3215)).toBe('1.322');
    expect(fmtPrice(0.6685)).toBe('0.669');
    expect(fmtPrice(1.3215)).toBe(screen(1.3215));
    expect(fmtPrice(0.6685)).toBe(screen(0.6685));
  });

  it('keeps the digits rule and groups thousands like the screens', () => {
    for (const v of [0.5, 9.9995, 10, 178.925, 212.125, 1234.5, 25.855]) expect(fmtPrice(v)).toBe(screen(v));
    expect(fmtPrice(1234.5)).toBe('1,234.50');
    expect(fmtPrice(-0.25)).toBe('−0.250');
    expect(fmtPct(19.05)).toBe('19.1 %');
  });

  it("writes last season's price in the explanation as the base price is shown", () => {
    const c = computeExpectation({ item: 'nitrogen', method: { kind: 'last' } }, { history: series(2021, [1.2, 1.25, 1.3, 1.3215]), target: { season: '2025/26', year: 2025 }, futures: none, priceUnit: 'EUR/kg N' });
    expect(c.explanation).toContain('last season: 1.322 EUR/kg N');
    expect(c.explanation).not.toContain('1.321 ');
  });
});
