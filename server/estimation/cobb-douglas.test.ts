import { describe, expect, it } from 'vitest';
import type { NetputDataset } from './dataset.js';
import { fitProfitFunction } from './fit.js';
import { symmetricEigen } from './linalg.js';
import { SeededRandom } from './random.js';
import { elasticitiesAt } from './results.js';

// Closed-form Cobb–Douglas technology y = A·x1^a1·x2^a2 (a = a1 + a2 < 1): profit, supply and
// input demands (standard textbook derivation, e.g. Varian, Microeconomic Analysis, ch. 1–2;
// check points and formulas in docs/sources.md §3).
interface Tech {
  a1: number;
  a2: number;
  A: number;
}
const profit = ({ a1, a2, A }: Tech, p: number, w1: number, w2: number): number => {
  const a = a1 + a2;
  return (1 - a) * Math.pow(p * A, 1 / (1 - a)) * Math.pow(a1 / w1, a1 / (1 - a)) * Math.pow(a2 / w2, a2 / (1 - a));
};
const supply = ({ a1, a2, A }: Tech, p: number, w1: number, w2: number): number => {
  const a = a1 + a2;
  return Math.pow(A, 1 / (1 - a)) * Math.pow(p, a / (1 - a)) * Math.pow(a1 / w1, a1 / (1 - a)) * Math.pow(a2 / w2, a2 / (1 - a));
};
const demand1 = (t: Tech, p: number, w1: number, w2: number): number => (t.a1 * p * supply(t, p, w1, w2)) / w1;
const demand2 = (t: Tech, p: number, w1: number, w2: number): number => (t.a2 * p * supply(t, p, w1, w2)) / w2;
const netputs = (t: Tech, [p, w1, w2]: number[]): number[] => [supply(t, p!, w1!, w2!), -demand1(t, p!, w1!, w2!), -demand2(t, p!, w1!, w2!)];

function expectRel(actual: number, expected: number, tol: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tol * Math.abs(expected));
}

describe("Cobb–Douglas profit function: an exact Hotelling's-lemma check", () => {
  // Check points: docs/sources.md §3 table (rows 1–2 exact by hand; row 3 computed there).
  const points: [Tech, number[], number[]][] = [
    [{ a1: 0.25, a2: 0.25, A: 1 }, [4, 1, 1], [2, 1, 1, 1]],
    [{ a1: 0.25, a2: 0.25, A: 1 }, [4, 1, 4], [1, 0.5, 0.5, 0.125]],
    [{ a1: 0.3, a2: 0.5, A: 1 }, [10, 1, 2], [102.6979795322186, 51.34898976610932, 154.046969298328, 128.3724744152733]],
  ];

  it('profit, supply and demands match the check values', () => {
    for (const [t, [p, w1, w2], [pi, y, x1, x2]] of points) {
      expectRel(profit(t, p!, w1!, w2!), pi!, 1e-14);
      expectRel(supply(t, p!, w1!, w2!), y!, 1e-14);
      expectRel(demand1(t, p!, w1!, w2!), x1!, 1e-14);
      expectRel(demand2(t, p!, w1!, w2!), x2!, 1e-14);
    }
  });

  it('∂π/∂p = y*, ∂π/∂w1 = −x1*, ∂π/∂w2 = −x2* (central differences)', () => {
    for (const [t, prices] of points) {
      const y = netputs(t, prices);
      prices.forEach((_, j) => {
        const h = 1e-5 * prices[j]!;
        const up = prices.slice();
        const dn = prices.slice();
        up[j]! += h;
        dn[j]! -= h;
        const d = (profit(t, up[0]!, up[1]!, up[2]!) - profit(t, dn[0]!, dn[1]!, dn[2]!)) / (2 * h);
        expectRel(d, y[j]!, 1e-8);
      });
    }
  });

  it('the price Hessian at row 3 is convex with eigenvalues ≈ {532.897188084, 97.4116612948, 0}', () => {
    const [t, prices] = points[2]!;
    const H = prices.map((_, j) => {
      const h = 1e-5 * prices[j]!;
      const up = prices.slice();
      const dn = prices.slice();
      up[j]! += h;
      dn[j]! -= h;
      const yu = netputs(t, up);
      const yd = netputs(t, dn);
      return yu.map((v, i) => (v - yd[i]!) / (2 * h));
    });
    const eig = symmetricEigen(H).values;
    expect(Math.abs(eig[0]!)).toBeLessThan(1e-5);
    expectRel(eig[1]!, 97.4116612948, 1e-7);
    expectRel(eig[2]!, 532.897188084, 1e-7);
  });
});

describe('profit functions fitted to data from a Cobb–Douglas technology recover its elasticities', () => {
  // a1 = a2 = 1/4: ε(y,p) = a/(1−a) = 1, ε(y,w_k) = −a_k/(1−a) = −0.5, ε(x1,p) = 1/(1−a) = 2,
  // ε(x1,w1) = −(1−a2)/(1−a) = −1.5, ε(x1,w2) = −a2/(1−a) = −0.5, and symmetrically for x2.
  const tech: Tech = { a1: 0.25, a2: 0.25, A: 10 };
  const exact = [
    [1, -0.5, -0.5],
    [2, -1.5, -0.5],
    [2, -0.5, -1.5],
  ];
  const rng = new SeededRandom(42);
  const T = 400;
  const base = [20, 2, 3];
  const ds: NetputDataset = {
    items: [
      { name: 'crop', role: 'output' },
      { name: 'fertiliser', role: 'input' },
      { name: 'labour', role: 'input' },
    ],
    fixedFactors: [],
    seasons: [],
    seasonYears: [],
    farms: null,
    prices: [[], [], []],
    quantities: [[], [], []],
    fixed: [],
    rows: [],
  };
  for (let t = 0; t < T; t++) {
    // prices log-normal around the base (sd 8%); quantities with 0.2% multiplicative noise
    const pr = base.map((b) => b * Math.exp(0.08 * rng.normal()));
    const y = netputs(tech, pr);
    pr.forEach((v, i) => {
      ds.prices[i]!.push(v);
      ds.quantities[i]!.push(Math.abs(y[i]!) * (1 + 0.002 * rng.normal()));
    });
    ds.seasons.push(String(1990 + (t % 30)));
    ds.seasonYears.push(1990 + (t % 30));
    ds.rows.push(t + 2);
  }
  // The flexible forms are second-order approximations: at the sample means they should be
  // close to the constant Cobb–Douglas elasticities, not equal (tolerance from the 8% price spread).
  for (const form of ['nq', 'gl'] as const) {
    it(`${form.toUpperCase()} elasticities at the means are within 0.03 of the exact values`, () => {
      const fit = fitProfitFunction(ds, { form });
      expect(fit.curvature.imposed).toBe(false);
      const el = elasticitiesAt(fit);
      el.elasticities.forEach((row, i) => row.forEach((e, j) => expect(Math.abs(e - exact[i]![j]!), `e[${i}][${j}] = ${e}`).toBeLessThan(0.03)));
      // every elasticity gets a positive delta-method standard error
      el.elasticities.forEach((row, i) => row.forEach((_, j) => expect(el.standardErrors[i]![j]!).toBeGreaterThan(0)));
    });
  }
});
