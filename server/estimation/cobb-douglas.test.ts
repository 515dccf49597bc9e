import { describe, expect, it } from 'vitest';
import type { NetputDataset } from './dataset.js';
import { fitProfitFunction } from './fit.js';
import { SeededRandom } from './random.js';
import { elasticitiesAt, evaluateFit } from './results.js';

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

// The closed forms above only generate test data; they are not the engine. This block checks them
// against the check points (rows 1–2 exact by hand), so that the engine checks below rest on data
// from the right technology.
const checkPoints: [Tech, number[], number[]][] = [
  [{ a1: 0.25, a2: 0.25, A: 1 }, [4, 1, 1], [2, 1, 1, 1]],
  [{ a1: 0.25, a2: 0.25, A: 1 }, [4, 1, 4], [1, 0.5, 0.5, 0.125]],
  [{ a1: 0.3, a2: 0.5, A: 1 }, [10, 1, 2], [102.6979795322186, 51.34898976610932, 154.046969298328, 128.3724744152733]],
];

describe('the Cobb–Douglas data generator of this file', () => {
  it('reproduces the check points: profit, supply and demands', () => {
    for (const [t, [p, w1, w2], [pi, y, x1, x2]] of checkPoints) {
      expectRel(profit(t, p!, w1!, w2!), pi!, 1e-14);
      expectRel(supply(t, p!, w1!, w2!), y!, 1e-14);
      expectRel(demand1(t, p!, w1!, w2!), x1!, 1e-14);
      expectRel(demand2(t, p!, w1!, w2!), x2!, 1e-14);
    }
  });
});

/** Observations drawn from a Cobb–Douglas technology: prices log-normal around `base`, quantities with multiplicative noise. */
function cobbDouglasData(tech: Tech, base: number[], priceSd: number, noise: number, T: number, seed: number): NetputDataset {
  const rng = new SeededRandom(seed);
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
    const pr = base.map((b) => b * Math.exp(priceSd * rng.normal()));
    const y = netputs(tech, pr);
    pr.forEach((v, i) => {
      ds.prices[i]!.push(v);
      ds.quantities[i]!.push(Math.abs(y[i]!) * (1 + noise * rng.normal()));
    });
    ds.seasons.push(String(1990 + (t % 30)));
    ds.seasonYears.push(1990 + (t % 30));
    ds.rows.push(t + 2);
  }
  return ds;
}

describe("the engine's fitted profit function against the Cobb–Douglas check point (docs/sources.md §3, row 3)", () => {
  // Fitted to 200 observations within about 1 % of row 3's prices (0.01 % quantity noise), each
  // form is a local second-order approximation of the technology. At the centre its netputs and
  // profit should match the closed form and its price Hessian should have the check point's
  // eigenvalues {0, 97.4116612948, 532.897188084}. Tolerances: the quadratic's fit over the 1 %
  // spread biases netputs by about 2e-3 relative, and the estimated Hessian's eigenvalues vary by
  // about 1.5 % between random samples (measured over six seeds), so 5e-3 and 3 % respectively.
  const [tech, prices, [pi, y, x1, x2]] = checkPoints[2]!;
  const ds = cobbDouglasData(tech, prices, 0.01, 1e-4, 200, 3);
  for (const form of ['nq', 'gl'] as const) {
    it(`${form.toUpperCase()}: netputs, profit and the price Hessian's eigenvalues at p = 10, w1 = 1, w2 = 2`, () => {
      const fit = fitProfitFunction(ds, { form });
      expect(fit.curvature.imposed).toBe(false);
      const ev = evaluateFit(fit, { prices: { crop: prices[0]!, fertiliser: prices[1]!, labour: prices[2]! } });
      expectRel(ev.netputs[0]!, y!, 5e-3);
      expectRel(ev.netputs[1]!, -x1!, 5e-3);
      expectRel(ev.netputs[2]!, -x2!, 5e-3);
      expectRel(ev.profit, pi!, 5e-3);
      const [zero, mid, top] = ev.hessianEigenvalues;
      expect(Math.abs(zero!)).toBeLessThan(1e-9 * top!);
      expectRel(mid!, 97.4116612948, 0.03);
      expectRel(top!, 532.897188084, 0.03);
      expect(ev.convex).toBe(true);
    });
  }
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
  // prices log-normal around (20, 2, 3) with sd 8%; quantities with 0.2% multiplicative noise
  const ds = cobbDouglasData(tech, [20, 2, 3], 0.08, 0.002, 400, 42);
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
