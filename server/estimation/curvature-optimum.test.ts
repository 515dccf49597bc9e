/**
 * The convexity step against an independent direct maximisation of the likelihood, on a
 * technology whose constrained optimum is rank-deficient (docs/profit-functions.md §7.3).
 *
 * Outside reference: a quasi-Newton (BFGS) minimiser, `numeric.uncmin` from the npm package
 * `numeric` 1.2.6, on a parameterisation of our own, written here and sharing nothing with
 * server/estimation beyond the data. B = L L′ with L lower triangular and free, so any B ⪰ 0 of
 * any rank is reachable. For a given B the remaining coefficients (intercepts and trend slopes)
 * multiply the same regressors [1, t] in every equation. By Zellner's result (1962, JASA
 * 57:348–368, from memory), maximum likelihood for them is then ordinary least squares equation
 * by equation, so the test maximises the log-likelihood concentrated in B alone:
 *   ℓ(B) = −T/2·(n·ln 2π + ln|Σ̂(B)| + n),  Σ̂(B) = E′E/T,  E = OLS residuals on [1, t].
 */
import numeric from 'numeric';
import { describe, expect, it } from 'vitest';
import { KKT_TOLERANCE } from './curvature.js';
import type { NetputDataset } from './dataset.js';
import { fitProfitFunction } from './fit.js';
import { generateRankDeficientPanel, type SyntheticItem } from './synthetic.js';

// Invented items; true B = F F′ of rank 2 for n − 1 = 4 normalised prices (rank n − 3).
const items: SyntheticItem[] = [
  { name: 'barley', role: 'output', price: 200, quantity: 1000 },
  { name: 'peas', role: 'output', price: 300, quantity: 400 },
  { name: 'seed', role: 'input', price: 50, quantity: 300 },
  { name: 'fuel', role: 'input', price: 100, quantity: 500 },
  { name: 'other', role: 'input', price: 100, quantity: 1500 },
];
const factor = [
  [12, 4],
  [3, 8],
  [-2, 5],
  [-5, -3],
];
// Seed 3: before the rewrite, numeraires seed and fuel (with or without trend) stopped with
// "fit: internal error: LU matrix is singular".
const data = generateRankDeficientPanel({ items, factor, seasons: 24, firstSeason: 2001, seed: 3, noise: 0.05 });

/** Negative concentrated log-likelihood of the NQ system with numeraire `num`, as a function of vec(L). */
function negLogLikelihood(ds: NetputDataset, num: string, trend: boolean): { f: (l: number[]) => number; size: number } {
  const order = ds.items.map((_, i) => i).filter((i) => ds.items[i]!.name !== num);
  order.push(ds.items.findIndex((it) => it.name === num));
  const n = order.length;
  const m = n - 1;
  const T = ds.seasons.length;
  const y = order.map((i) => ds.quantities[i]!.map((q) => (ds.items[i]!.role === 'output' ? q : -q)));
  const pt = order.slice(0, m).map((i) => ds.prices[i]!.map((p, t) => p / ds.prices[order[m]!]![t]!));
  const t0 = Math.min(...ds.seasonYears);
  const Z = ds.seasonYears.map((yr) => (trend ? [1, yr - t0 + 1] : [1]));
  // OLS residual maker on Z: e = u − Z (Z′Z)⁻¹ Z′u.
  const k = Z[0]!.length;
  const ZtZ = Array.from({ length: k }, (_, a) => Array.from({ length: k }, (_, b) => Z.reduce((s, z) => s + z[a]! * z[b]!, 0)));
  const ZtZinv = numeric.inv(ZtZ);
  const resid = (u: number[]): number[] => {
    const Ztu = Array.from({ length: k }, (_, a) => Z.reduce((s, z, t) => s + z[a]! * u[t]!, 0));
    const beta = ZtZinv.map((row) => row.reduce((s, v, b) => s + v * Ztu[b]!, 0));
    return u.map((v, t) => v - Z[t]!.reduce((s, z, a) => s + z * beta[a]!, 0));
  };
  const f = (l: number[]): number => {
    const L = Array.from({ length: m }, () => new Array<number>(m).fill(0));
    let e = 0;
    for (let i = 0; i < m; i++) for (let j = 0; j <= i; j++) L[i]![j] = l[e++]!;
    const B = L.map((ri) => L.map((rj) => ri.reduce((s, v, c) => s + v * rj[c]!, 0)));
    const E: number[][] = [];
    for (let i = 0; i < m; i++) E.push(resid(y[i]!.map((v, t) => v - B[i]!.reduce((s, b, j) => s + b * pt[j]![t]!, 0))));
    E.push(
      resid(
        y[m]!.map((v, t) => {
          let q = 0;
          for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) q += B[i]![j]! * pt[i]![t]! * pt[j]![t]!;
          return v + 0.5 * q;
        }),
      ),
    );
    const S = E.map((ei) => E.map((ej) => ei.reduce((s, v, t) => s + v * ej[t]!, 0) / T));
    const det = numeric.det(S);
    return (T / 2) * (n * Math.log(2 * Math.PI) + Math.log(det) + n);
  };
  return { f, size: m };
}

/** Best of several BFGS runs from seeded starts, each polished by a second run. */
function directMaximum(ds: NetputDataset, num: string, trend: boolean): number {
  const { f, size } = negLogLikelihood(ds, num, trend);
  const nl = (size * (size + 1)) / 2;
  let state = 12345;
  const rand = (): number => ((state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 2 ** 32) - 0.5;
  let best = Infinity;
  for (let start = 0; start < 4; start++) {
    const x0: number[] = [];
    for (let i = 0; i < size; i++) for (let j = 0; j <= i; j++) x0.push((i === j ? 5 : 0) + 4 * rand());
    let r = numeric.uncmin(f, x0, 1e-10, undefined, 5000);
    r = numeric.uncmin(f, r.solution, 1e-12, undefined, 5000);
    if (r.f < best) best = r.f;
  }
  expect(nl).toBeGreaterThan(0);
  return -best;
}

describe('convexity imposed at a rank-deficient optimum, against a direct maximisation (docs/profit-functions.md §7.3)', () => {
  for (const num of items.map((i) => i.name))
    for (const trend of [false, true])
      it(`numeraire ${num}, ${trend ? 'with' : 'without'} trend: same log-likelihood as BFGS (numeric.uncmin) within 1e-8, KKT conditions hold`, () => {
        const free = fitProfitFunction(data, { numeraire: num, trend, curvature: 'check' });
        expect(free.curvature.unrestrictedConvex).toBe(false);
        const fit = fitProfitFunction(data, { numeraire: num, trend });
        expect(fit.curvature.imposed).toBe(true);
        expect(fit.converged).toBe(true);
        // The optimum is on the boundary: B has rank below n − 1 = 4.
        expect(fit.curvature.binding).toBe(true);
        const eig = fit.curvature.eigenvalues;
        expect(eig.filter((v) => v > 1e-6 * eig.at(-1)!).length).toBeLessThan(4);
        expect(eig[0]!).toBeGreaterThanOrEqual(-1e-9 * eig.at(-1)!);
        // KKT: stationarity, B ⪰ 0, G = ∂f/∂B ⪰ 0, G·B = 0, each within KKT_TOLERANCE.
        const opt = fit.curvature.optimality!;
        expect(opt.satisfied).toBe(true);
        expect(opt.stationarity).toBeLessThanOrEqual(KKT_TOLERANCE);
        expect(opt.dualMinEigenvalue).toBeGreaterThanOrEqual(-KKT_TOLERANCE);
        expect(opt.complementarity).toBeLessThanOrEqual(KKT_TOLERANCE);
        expect(opt.primalMinEigenvalue!).toBeGreaterThanOrEqual(-KKT_TOLERANCE);
        // Outside reference: the direct maximisation (numeric.uncmin, BFGS) of the same likelihood.
        const direct = directMaximum(data, num, trend);
        // (measured when written: gaps of 1e-13 to 1e-11 across the ten cases)
        expect(Math.abs(fit.logLikelihood - direct)).toBeLessThanOrEqual(1e-8);
      });

  it('GL, with and without trend: convexity at the mean prices binds, the fit converges and its KKT conditions hold', () => {
    for (const trend of [false, true]) {
      const fit = fitProfitFunction(data, { form: 'gl', trend });
      expect(fit.curvature.imposed).toBe(true);
      expect(fit.converged).toBe(true);
      expect(fit.curvature.binding).toBe(true);
      expect(fit.curvature.optimality!.satisfied).toBe(true);
    }
  });

  it('stopped before the optimum (iteration cap), the result says it did not converge, never success', () => {
    const fit = fitProfitFunction(data, { numeraire: 'seed', maxIterations: 3 });
    expect(fit.curvature.imposed).toBe(true);
    expect(fit.converged).toBe(false);
    expect(fit.curvature.converged).toBe(false);
    expect(fit.curvature.optimality!.satisfied).toBe(false);
    expect(fit.warnings.join(' ')).toMatch(/convexity-constrained fit did not converge: .*optimality \(Karush–Kuhn–Tucker\) conditions do not hold/);
  });
});
