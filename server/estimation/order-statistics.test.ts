import { describe, expect, it } from 'vitest';
import { bracketedOrderStatistics, drawGrid, gridBin, gridOrderStatistics, quantileRanks, rangeOrderStatistics, summarise } from './order-statistics.js';
import { SeededRandom } from './random.js';

// Reference for every check here: R's type-7 quantile, written out below as its definition,
// h = (N − 1)·p with linear interpolation between the order statistics ⌊h⌋ and ⌊h⌋ + 1 (Hyndman &
// Fan 1996, The American Statistician 50:361–365, from memory; R's default `quantile`), on a full
// sort of the sample. Samples are seeded; each failure message names the seed and the sample.

const ascending = (x: ArrayLike<number>): number[] => Array.from(x).sort((a, b) => a - b);

function type7(sorted: number[], p: number): number {
  const N = sorted.length;
  const h = (N - 1) * p;
  const lo = Math.floor(h);
  return sorted[lo]! + (h - lo) * (sorted[Math.min(lo + 1, N - 1)]! - sorted[lo]!);
}

describe('summarise', () => {
  it('gives R type-7 quantiles exactly (normal and skewed samples)', () => {
    const seed = 9;
    const rng = new SeededRandom(seed);
    for (const [N, skewed] of [[100, false], [1001, false], [10000, false], [10000, true], [999, true]] as const) {
      const x = Float64Array.from({ length: N }, () => (skewed ? Math.exp(1.5 * rng.normal()) : rng.normal() * 3 + 10));
      const sorted = ascending(x);
      const s = summarise(Float64Array.from(x), 0);
      const what = `seed ${seed}, N ${N}${skewed ? ', skewed' : ''}`;
      expect(s.p5, what).toBe(type7(sorted, 0.05));
      expect(s.median, what).toBe(type7(sorted, 0.5));
      expect(s.p95, what).toBe(type7(sorted, 0.95));
      const mean = sorted.reduce((a, b) => a + b, 0) / N;
      expect(s.mean, what).toBeCloseTo(mean, 10);
    }
  });

  it('gives exact quantiles where the brackets miss (two far-apart clusters) and for a constant sample', () => {
    const seed = 31;
    const rng = new SeededRandom(seed);
    // 70 % near 0, 30 % near 100: no quantile sits near mean + z·sd, so the range histogram answers
    const x = Float64Array.from({ length: 2000 }, (_, i) => (i % 10 < 7 ? rng.normal() : 100 + rng.normal()));
    const sorted = ascending(x);
    const s = summarise(x, 5);
    expect(s.p5, `seed ${seed}`).toBe(type7(sorted, 0.05));
    expect(s.median, `seed ${seed}`).toBe(type7(sorted, 0.5));
    expect(s.p95, `seed ${seed}`).toBe(type7(sorted, 0.95));
    expect(s.point).toBe(5);
    expect(summarise(new Float64Array(50).fill(2.5), 2.5)).toEqual({ point: 2.5, mean: 2.5, sd: 0, median: 2.5, p5: 2.5, p95: 2.5 });
  });
});

describe('the three order-statistic searches', () => {
  it('quantileRanks names the order statistics either side of (N − 1)·p for p = 5, 50, 95 %', () => {
    // N = 101: h = 5, 50, 95 exactly, so the upper neighbours are 6, 51, 96
    expect(quantileRanks(101).sort((a, b) => a - b)).toEqual([5, 6, 50, 51, 95, 96]);
    // N = 2000: h = 99.95, 999.5, 1899.05
    expect(quantileRanks(2000).sort((a, b) => a - b)).toEqual([99, 100, 999, 1000, 1899, 1900]);
  });

  it('the grid search, the bracket search and the range histogram give the sorted sample at every wanted rank', () => {
    for (const seed of [1, 2, 3, 4, 5]) {
      const rng = new SeededRandom(seed);
      const N = 500 + 997 * seed;
      const mean = 40 * seed;
      const sd = 3 + seed;
      const x = Float64Array.from({ length: N }, () => mean + sd * rng.normal());
      const sorted = ascending(x);
      const ranks = quantileRanks(N);
      const grid = drawGrid(mean, sd);
      for (const v of x) grid.counts[gridBin(v, grid.lo, grid.scale)]!++;
      const byGrid = gridOrderStatistics(Float64Array.from(x), grid, ranks);
      // the brackets sit around the sample's own mean and SD, as summarise places them
      const m = x.reduce((a, v) => a + v, 0) / N;
      const sdSample = Math.sqrt(x.reduce((a, v) => a + (v - m) ** 2, 0) / (N - 1));
      const byBrackets = bracketedOrderStatistics(x, ranks, m, sdSample);
      const byRange = rangeOrderStatistics(x, ranks, sorted[0]!, sorted[N - 1]!);
      for (const r of ranks) {
        const what = `seed ${seed}, N ${N}, rank ${r}`;
        expect(byGrid?.get(r), what).toBe(sorted[r]);
        expect(byBrackets?.get(r), what).toBe(sorted[r]);
        expect(byRange.get(r), what).toBe(sorted[r]);
      }
    }
  });

  it('the grid and bracket searches decline (null) when a wanted rank lies outside their reach', () => {
    const seed = 12;
    const rng = new SeededRandom(seed);
    const x = Float64Array.from({ length: 1000 }, () => 50 + rng.normal());
    const ranks = quantileRanks(x.length);
    // a grid centred far from the draws: every value falls in an end bin
    const grid = drawGrid(0, 1);
    for (const v of x) grid.counts[gridBin(v, grid.lo, grid.scale)]!++;
    expect(gridOrderStatistics(x, grid, ranks), `seed ${seed}`).toBeNull();
    // no width (sd 0): the grid answers nothing
    const flat = drawGrid(50, 0);
    for (const v of x) flat.counts[gridBin(v, flat.lo, flat.scale)]!++;
    expect(gridOrderStatistics(x, flat, ranks)).toBeNull();
    // brackets around the wrong mean
    expect(bracketedOrderStatistics(x, ranks, 0, 1), `seed ${seed}`).toBeNull();
  });
});
