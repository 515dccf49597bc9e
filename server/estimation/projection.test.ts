import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseNetputCsv } from './dataset.js';
import { EstimationInputError } from './errors.js';
import { fitProfitFunction } from './fit.js';
import { projectSeason } from './projection.js';
import { SeededRandom } from './random.js';
import { deltaMethod, evaluateFit } from './results.js';

const fixtures = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'tests', 'fixtures', 'estimation');
const fit = fitProfitFunction(parseNetputCsv(readFileSync(join(fixtures, 'nq-panel.csv'), 'utf8')), { trend: true });
const farms = [
  { id: 'north', fixed: { land: 320 } },
  { id: 'river', fixed: { land: 610 } },
  { id: 'hill', fixed: { land: 450 } },
];
const prices = { wheat: 265, canola: 540, nitrogen: 125 };

describe('season projection (Monte Carlo, seeded)', () => {
  it('is reproducible for a seed and changes with it', () => {
    const a = projectSeason(fit, { scenarios: prices, farms, draws: 500, seed: 11 });
    const b = projectSeason(fit, { scenarios: prices, farms, draws: 500, seed: 11 });
    const c = projectSeason(fit, { scenarios: prices, farms, draws: 500, seed: 12 });
    expect(b).toEqual(a);
    expect(c.scenarios[0]!.coop['wheat']!.p95).not.toBe(a.scenarios[0]!.coop['wheat']!.p95);
    expect(a.season).toBe(2025); // last season 2024 + 1: trend 17
    expect(a.scenarios[0]!.farms[0]!.fixed).toEqual({ land: 320, trend: 17 });
    expect(a.caution).toMatch(/not financial advice/);
  });

  it('point values are the fitted supply and demand, and the co-op point is their sum', () => {
    const r = projectSeason(fit, { scenarios: prices, farms, draws: 200, seed: 1 });
    const sc = r.scenarios[0]!;
    fit.layout.items.forEach((it, i) => {
      let total = 0;
      for (const f of farms) {
        const y = evaluateFit(fit, { prices, fixed: { land: f.fixed.land, trend: 17 } }).netputs[i]!;
        const q = it.role === 'output' ? y : -y;
        expect(sc.farms.find((x) => x.id === f.id)!.quantities[it.name]!.point).toBeCloseTo(q, 8);
        total += q;
      }
      expect(sc.coop[it.name]!.point).toBeCloseTo(total, 8);
    });
  });

  it('bands match the exact normal law of a model linear in θ: N(ŷ, a′Va + σ_ii)', () => {
    // y(p, z; θ) is linear in θ for the NQ, so with θ ~ N(θ̂, V) and u ~ N(0, Σ̂) each projected
    // netput is exactly normal; Monte Carlo moments and quantiles must agree within sampling error.
    const S = 20000;
    const r = projectSeason(fit, { scenarios: prices, farms, draws: S, seed: 3 });
    const sc = r.scenarios[0]!;
    const z90 = 1.6448536269514722; // standard normal 95% point (handbook value)
    fit.layout.items.forEach((it, i) => {
      const sign = it.role === 'output' ? 1 : -1;
      const check = (summary: { mean: number; sd: number; p5: number; p95: number }, mu: number, sd: number): void => {
        expect(Math.abs(summary.mean - mu)).toBeLessThan((4 * sd) / Math.sqrt(S));
        expect(Math.abs(summary.sd / sd - 1)).toBeLessThan(0.03);
        expect(Math.abs(summary.p5 - (mu - z90 * sd))).toBeLessThan(0.06 * sd);
        expect(Math.abs(summary.p95 - (mu + z90 * sd))).toBeLessThan(0.06 * sd);
      };
      const farm = farms[1]!;
      const pt = { prices, fixed: { land: farm.fixed.land, trend: 17 } };
      const { value, standardErrors } = deltaMethod(fit, (th) => [evaluateFit({ ...fit, theta: th }, pt).netputs[i]!]);
      check(sc.farms[1]!.quantities[it.name]!, sign * value[0]!, Math.sqrt(standardErrors[0]! ** 2 + fit.sigma[i]![i]!));
      const total = deltaMethod(fit, (th) => [farms.reduce((s, f) => s + evaluateFit({ ...fit, theta: th }, { prices, fixed: { land: f.fixed.land, trend: 17 } }).netputs[i]!, 0)]);
      check(sc.coop[it.name]!, sign * total.value[0]!, Math.sqrt(total.standardErrors[0]! ** 2 + farms.length * fit.sigma[i]![i]!));
    });
    expect(sc.curvatureViolations).toBe(0); // B's smallest eigenvalue is many SEs from zero here
  });

  it('low/base/high scenarios move wheat supply in the direction of its price', () => {
    const r = projectSeason(fit, {
      scenarios: [
        { name: 'low', prices: { ...prices, wheat: 210 } },
        { name: 'base', prices },
        { name: 'high', prices: { ...prices, wheat: 320 } },
      ],
      farms,
      draws: 1000,
      seed: 5,
    });
    const w = r.scenarios.map((s) => s.coop['wheat']!.median);
    expect(w[0]!).toBeLessThan(w[1]!);
    expect(w[1]!).toBeLessThan(w[2]!);
    // nitrogen demand rises with the wheat price (complementary input)
    const n = r.scenarios.map((s) => s.coop['nitrogen']!.point);
    expect(n[2]!).toBeGreaterThan(n[0]!);
  });

  it('rejects a farm without its land, an unknown factor and too few draws', () => {
    expect(() => projectSeason(fit, { scenarios: prices, farms: [{ id: 'x', fixed: {} }], draws: 200 })).toThrow(/farm x: fixed factor "land" is missing/);
    expect(() => projectSeason(fit, { scenarios: prices, farms: [{ id: 'x', fixed: { land: 3, soil: 2 } }], draws: 200 })).toThrow(EstimationInputError);
    expect(() => projectSeason(fit, { scenarios: prices, farms, draws: 10 })).toThrow(/at least 100/);
    expect(() => projectSeason(fit, { scenarios: { barley: 3 }, farms, draws: 200 })).toThrow(/"barley" is not an item/);
  });
});

describe('Monte Carlo building blocks', () => {
  it('one farm: its summary (one-pass bracket search) equals the co-op summary of the same draws', () => {
    const r = projectSeason(fit, { scenarios: prices, farms: [farms[0]!], draws: 5000, seed: 21 });
    const sc = r.scenarios[0]!;
    for (const it of fit.layout.items) {
      const f = sc.farms[0]!.quantities[it.name]!;
      const c = sc.coop[it.name]!;
      expect(f.median).toBe(c.median);
      expect(f.p5).toBe(c.p5);
      expect(f.p95).toBe(c.p95);
      expect(f.mean).toBeCloseTo(c.mean, 9);
    }
  });

  it('the ziggurat normals have the standard normal moments and tail mass', () => {
    // P(|Z| > 1.959964) = 0.05 and E Z⁴ = 3 (standard normal, handbook values).
    const rng = new SeededRandom(2024);
    const N = 400000;
    let s1 = 0;
    let s2 = 0;
    let s4 = 0;
    let tail = 0;
    for (let i = 0; i < N; i++) {
      const z = rng.normal();
      s1 += z;
      s2 += z * z;
      s4 += z ** 4;
      if (Math.abs(z) > 1.959963984540054) tail++;
    }
    expect(Math.abs(s1 / N)).toBeLessThan(0.008);
    expect(Math.abs(s2 / N - 1)).toBeLessThan(0.01);
    expect(Math.abs(s4 / N - 3)).toBeLessThan(0.06);
    expect(Math.abs(tail / N - 0.05)).toBeLessThan(0.0015);
  });
});
