import { describe, expect, it } from 'vitest';
import { CoopSums, FarmFigures, quadForm, summarise, type ItemSets } from './contracted-bands.js';
import { costAndSpending } from './contracted-core.js';
import type { FarmSetup } from './contracted-setup.js';
import { NO_STRETCH, type Stretch } from './forecast.js';
import { SeededRandom } from './random.js';

// Focused checks of the contracted evaluation's bands (method: docs/cost-duality.md §6). The
// quantiles are checked against R's type-7 definition written out below (Hyndman & Fan 1996, The
// American Statistician 50:361–365, from memory; R's default `quantile`); the figures against sums
// worked by hand in the comments.

function type7(sorted: number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  return sorted[lo]! + (h - lo) * (sorted[Math.min(lo + 1, sorted.length - 1)]! - sorted[lo]!);
}

/** The probabilities the evaluation asks for at a level (as evaluateContracted builds them). */
const probsAt = (level: number): number[] => [...new Set([(1 - level) / 2, 0.05, 0.5, 0.95, (1 + level) / 2])].sort((a, b) => a - b);

describe('summarise (a figure over the draws that could be evaluated)', () => {
  it('takes the type-7 quantiles of the draws marked ok only, and widens the band to hold the point', () => {
    const seed = 5;
    const rng = new SeededRandom(seed);
    const values = Float64Array.from({ length: 400 }, () => 100 + 10 * rng.normal());
    const ok = Uint8Array.from({ length: 400 }, (_, s) => (s % 5 === 0 ? 0 : 1));
    values[0] = 1e9; // a failed draw's leftover: must not count
    const kept = Array.from(values).filter((_, s) => ok[s]).sort((a, b) => a - b);
    const b = summarise(values, ok, 101, probsAt(0.8), 0.8, false, NO_STRETCH);
    expect(b.median, `seed ${seed}`).toBe(type7(kept, 0.5));
    expect(b.p5, `seed ${seed}`).toBe(type7(kept, 0.05));
    expect(b.p95, `seed ${seed}`).toBe(type7(kept, 0.95));
    expect(b.lower, `seed ${seed}`).toBe(type7(kept, (1 - 0.8) / 2));
    expect(b.upper, `seed ${seed}`).toBe(type7(kept, (1 + 0.8) / 2));
    expect(b.mean).toBeCloseTo(kept.reduce((a, v) => a + v, 0) / kept.length, 9);
    // a point above the band's upper end becomes the upper end
    expect(summarise(values, ok, 1000, probsAt(0.8), 0.8, false, NO_STRETCH).upper).toBe(1000);
  });

  it('stretches each quantile’s distance from the median by the ratio, the SD by its factor, and clips at zero where asked', () => {
    const values = Float64Array.from([-4, -1, 0, 2, 3]);
    const ok = new Uint8Array(5).fill(1);
    const double: Stretch = { ratio: () => 2, sdFactor: 3 };
    const plain = summarise(values, ok, 0, probsAt(0.9), 0.9, false, NO_STRETCH);
    const wide = summarise(values, ok, 0, probsAt(0.9), 0.9, false, double);
    // type 7 on (−4, −1, 0, 2, 3): p = 0.95 → h = 3.8 → 2 + 0.8·1 = 2.8; the median is 0
    expect(plain.p95).toBeCloseTo(2.8, 12);
    expect(wide.p95).toBeCloseTo(5.6, 12);
    // p = 0.05 → h = 0.2 → −4 + 0.2·3 = −3.4, stretched −6.8
    expect(wide.p5).toBeCloseTo(-6.8, 12);
    expect(wide.sd).toBeCloseTo(3 * plain.sd, 12);
    const clipped = summarise(values, ok, 0, probsAt(0.9), 0.9, true, NO_STRETCH);
    expect(clipped.p5).toBe(0);
    expect(clipped.p95).toBeCloseTo(2.8, 12);
    // no draw evaluated: every figure is the point
    expect(summarise(values, new Uint8Array(5), 7, probsAt(0.9), 0.9, false, NO_STRETCH)).toEqual({ point: 7, mean: 7, sd: 0, median: 7, p5: 7, p95: 7, lower: 7, upper: 7 });
  });

  it('quadForm is x′Vx (by hand: x = (1, 2), V = [[2, 1], [1, 3]] → 2 + 2·2 + 4·3 = 18)', () => {
    expect(quadForm([[2, 1], [1, 3]], [1, 2])).toBe(18);
    expect(quadForm(null, [1, 2])).toBe(0);
  });
});

describe('a farm’s figures and the co-op’s sums', () => {
  // Items: wheat (committed), canola (free), nitrogen, diesel. Per hectare at the solution:
  // prices (200, 500, 10, 2), netputs (5, 1, −3, −7).
  const roles = ['output', 'output', 'input', 'input'] as const;
  const sets: ItemSets = { roles: [...roles], isCommitted: [true, false, false, false], inputIdx: [2, 3], freeIdx: [1] };
  const p = [200, 500, 10, 2];
  const y = [5, 1, -3, -7];
  const farm = (land: number, quantity: number): FarmSetup => ({
    spec: { farm: 'F', fixed: { land }, contracted: { wheat: quantity } },
    prices: p,
    z: [],
    land,
    known: true,
    mu: [0, 0, 0, 0],
    noiseSd: [0, 0, 0, 0],
    committed: [0],
    quantity: [quantity],
    target: [quantity / land],
  });

  it('cost and input spending by hand: C = −(500·1 + 10·(−3) + 2·(−7)) = −456, spending 30 + 14 = 44', () => {
    expect(costAndSpending(roles, sets.isCommitted, p, y)).toEqual([-456, 44]);
  });

  it('records levels (× land, inputs as amounts) and sums farms within a slot, the marginal cost and margin weighted by tonnage', () => {
    const a = new FarmFigures(farm(100, 500), sets, 2);
    const b = new FarmFigures(farm(50, 250), sets, 2);
    a.record(1, p, y);
    b.record(1, [180, 500, 10, 2], y);
    expect([a.mc[0]![1], a.inputs[0]![1], a.inputs[1]![1], a.free[0]![1], a.cost[1], a.spend[1]]).toEqual([200, 300, 700, 100, -45600, 4400]);
    const coop = new CoopSums(4, 2);
    coop.add(1, a, 1, [240]);
    coop.add(1, b, 1, [undefined]);
    // marginal-cost numerator 500·200 + 250·180 = 145,000; margin only where a contract price is given: 500·(240 − 200) = 20,000
    expect(coop.mcNum[0]![1]).toBe(145000);
    expect(coop.marginNum[0]![1]).toBe(20000);
    // nitrogen 300 + 150, diesel 700 + 350, canola 100 + 50; cost −45,600 − 22,800; spending 4,400 + 2,200
    expect([coop.inputs[2]![1], coop.inputs[3]![1], coop.free[1]![1], coop.cost[1], coop.spend[1]]).toEqual([450, 1050, 150, -68400, 6600]);
    // slot 0 untouched
    expect(coop.cost[0]).toBe(0);
  });
});
