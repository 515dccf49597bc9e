import { describe, expect, it } from 'vitest';
import type { NetputDataset } from './dataset.js';
import { projectForecast } from './forecast.js';
import { fitForecastModel } from './panel.js';
import { SeededRandom } from './random.js';
import { elasticitiesAt, evaluateFit } from './results.js';

// Cobb–Douglas with constant returns in land: y = x1^a1·x2^a2·L^(1−a1−a2). With land fixed, profit is
// L times the decreasing-returns Cobb–Douglas profit of one hectare (Lau 1978; the closed forms are
// the textbook derivation, Varian, Microeconomic Analysis, ch. 1–2), so supply and demands are
// exactly proportional to land at given prices (docs/forecasting.md §4). Check row: a1 = 0.3,
// a2 = 0.5, A = 1, p = 10, w1 = 1, w2 = 2 gives per hectare y* = 51.34898976610932,
// x1* = 154.0469692983280, x2* = 128.3724744152733, π = 102.6979795322186 (docs/sources.md §3, row 3).
const a1 = 0.3;
const a2 = 0.5;
const a = a1 + a2;
const perHa = (p: number, w1: number, w2: number): number[] => {
  const y = Math.pow(p, a / (1 - a)) * Math.pow(a1 / w1, a1 / (1 - a)) * Math.pow(a2 / w2, a2 / (1 - a));
  return [y, (a1 * p * y) / w1, (a2 * p * y) / w2];
};
const ROW3 = { y: 51.34898976610932, x1: 154.046969298328, x2: 128.3724744152733, profit: 102.6979795322186 };

/** 40 farms of 20–800 ha over 12 seasons, prices within about 1 % of the check row, exact quantities. */
function panel(): NetputDataset {
  const rng = new SeededRandom(99);
  const farms = Array.from({ length: 40 }, (_, f) => 20 * Math.pow(40, f / 39));
  const ds: NetputDataset = {
    items: [
      { name: 'crop', role: 'output' },
      { name: 'fertiliser', role: 'input' },
      { name: 'labour', role: 'input' },
    ],
    fixedFactors: ['land'],
    seasons: [],
    seasonYears: [],
    farms: [],
    prices: [[], [], []],
    quantities: [[], [], []],
    fixed: [[]],
    rows: [],
  };
  for (let s = 0; s < 12; s++) {
    const season = [10, 1, 2].map((b) => b * Math.exp(0.01 * rng.normal()));
    farms.forEach((L, f) => {
      const pr = season.map((v) => v * Math.exp(0.003 * rng.normal()));
      const q = perHa(pr[0]!, pr[1]!, pr[2]!);
      pr.forEach((v, i) => ds.prices[i]!.push(v));
      q.forEach((v, i) => ds.quantities[i]!.push(v * L));
      ds.fixed[0]!.push(L);
      ds.seasons.push(String(2010 + s));
      ds.seasonYears.push(2010 + s);
      ds.farms!.push(`farm-${f}`);
      ds.rows.push(ds.rows.length + 2);
    });
  }
  return ds;
}

function expectRel(actual: number, expected: number, tol: number, what: string): void {
  expect(Math.abs(actual - expected), `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(tol * Math.abs(expected));
}

describe('per-hectare model against Cobb–Douglas with constant returns in land', () => {
  const ds = panel();
  const model = fitForecastModel(ds, { curvature: 'check' });
  const at = { crop: 10, fertiliser: 1, labour: 2 };

  it('the per-hectare fit reproduces the check row per hectare (NQ as a local approximation: 0.5 %)', () => {
    // Same tolerance reasoning as the pooled Cobb–Douglas check: the quadratic's fit over a 1 %
    // price spread biases netputs by about 2e-3 relative.
    const ev = evaluateFit(model.fit, { prices: at });
    expectRel(ev.netputs[0]!, ROW3.y, 5e-3, 'crop per ha');
    expectRel(-ev.netputs[1]!, ROW3.x1, 5e-3, 'fertiliser per ha');
    expectRel(-ev.netputs[2]!, ROW3.x2, 5e-3, 'labour per ha');
    expectRel(ev.profit, ROW3.profit, 5e-3, 'profit per ha');
  });

  it('projected supply and demands are exactly proportional to land at given prices', () => {
    const farms = [37.5, 75, 600].map((L, j) => ({ farm: `new-${j}`, fixed: { land: L } }));
    const proj = projectForecast(model, { farms, prices: at, draws: 200, seed: 1, parameterUncertainty: false });
    for (const item of ['crop', 'fertiliser', 'labour']) {
      const [q1, q2, q3] = proj.farms.map((f) => f.quantities[item]!.point);
      // exact property of the engine (constant returns to land): rounding only
      expect(Math.abs(q2! / q1! - 2)).toBeLessThan(1e-12);
      expect(Math.abs(q3! / q1! - 16)).toBeLessThan(1e-12);
    }
    const closed = [ROW3.y, ROW3.x1, ROW3.x2];
    ['crop', 'fertiliser', 'labour'].forEach((item, i) => expectRel(proj.farms[2]!.quantities[item]!.point, 600 * closed[i]!, 5e-3, `${item} on 600 ha`));
  });

  it("elasticities at the check row approach the closed form's constants (within 3 %)", () => {
    // ε(y,p) = a/(1−a) = 4, ε(y,w1) = −a1/(1−a) = −1.5, ε(y,w2) = −a2/(1−a) = −2.5,
    // ε(x1,p) = 1/(1−a) = 5, ε(x1,w1) = −(1−a2)/(1−a) = −2.5, ε(x1,w2) = −2.5,
    // ε(x2,p) = 5, ε(x2,w1) = −1.5, ε(x2,w2) = −(1−a1)/(1−a) = −3.5. Tolerance 3 % of each: as in
    // the pooled Cobb–Douglas check, second derivatives estimated over a 1 % price spread vary by
    // about 1.5 % between samples.
    const exact = [
      [4, -1.5, -2.5],
      [5, -2.5, -2.5],
      [5, -1.5, -3.5],
    ];
    const el = elasticitiesAt(model.fit, { prices: at });
    el.elasticities.forEach((row, i) => row.forEach((e, j) => expect(Math.abs(e - exact[i]![j]!), `e[${i}][${j}] = ${e}`).toBeLessThan(0.03 * Math.abs(exact[i]![j]!))));
  });

  it('finds no farm effects and no size dependence in data with neither (τ ≪ farm-to-farm spread of land)', () => {
    for (const t2 of model.farmEffects!.tau2) expect(Math.sqrt(t2)).toBeLessThan(1e-3 * ROW3.x1);
  });
});
