import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fitProfitFunction } from './fit.js';
import { formOf } from './forms.js';
import type { FormName, ModelLayout } from './model.js';
import { factorGradient, netputsFromDecomposition } from './model.js';
import { elasticitiesAt, evaluateFit } from './results.js';
import { generateNqPanel, type SyntheticItem } from './synthetic.js';

// Property tests (fast-check) of the identities every profit function must satisfy
// (standard duality theory; docs/profit-functions.md §1): symmetry of the price Hessian,
// homogeneity (H·p = 0, elasticity rows sum to zero), Hotelling's lemma (∂π/∂p_i = y_i) and the
// shadow value ∂π/∂z. Profit is computed from each form's own formula here, independently of the
// engine's netput code, and differentiated numerically.

function layoutFor(form: FormName, n: number, q: number, trend: boolean): ModelLayout {
  const items = Array.from({ length: n }, (_, i) => ({ name: `i${i}`, role: i % 2 === 0 ? ('output' as const) : ('input' as const) }));
  const factors = [...Array.from({ length: q }, (_, k) => `z${k}`), ...(trend ? ['trend'] : [])];
  return { form, items, numeraire: items[n - 1]!.name, factors, quadraticFactors: q, trendOrigin: trend ? 2000 : null, parameterNames: formOf(form).parameterNames(items, factors, q) };
}

/** NQ profit from its definition: π = p_n·[a0 + a'p̃ + ½p̃'Bp̃ + p̃'Cz + d'z + ½z'Gz]. */
function nqProfit(layout: ModelLayout, th: number[], p: number[], z: number[]): number {
  const names = layout.parameterNames;
  const v = (s: string): number => th[names.indexOf(s)]!;
  const it = layout.items.map((x) => x.name);
  const f = layout.factors;
  const n = it.length;
  const pn = p[n - 1]!;
  const pt = p.slice(0, n - 1).map((x) => x / pn);
  let s = v('a0');
  for (let i = 0; i < n - 1; i++) {
    s += v(`a[${it[i]}]`) * pt[i]!;
    for (let j = 0; j < n - 1; j++) s += 0.5 * v(`b[${it[Math.min(i, j)]},${it[Math.max(i, j)]}]`) * pt[i]! * pt[j]!;
    f.forEach((fk, k) => (s += v(`c[${it[i]},${fk}]`) * pt[i]! * z[k]!));
  }
  f.forEach((fk, k) => (s += v(`d[${fk}]`) * z[k]!));
  for (let k = 0; k < layout.quadraticFactors; k++)
    for (let l = 0; l < layout.quadraticFactors; l++) s += 0.5 * v(`g[${f[Math.min(k, l)]},${f[Math.max(k, l)]}]`) * z[k]! * z[l]!;
  return pn * s;
}

/** GL profit from its definition: Σ_ij b_ij √(p_i p_j) + Σ_i p_i (c_i'z + ½ z'G_i z). */
function glProfit(layout: ModelLayout, th: number[], p: number[], z: number[]): number {
  const names = layout.parameterNames;
  const v = (s: string): number => th[names.indexOf(s)]!;
  const it = layout.items.map((x) => x.name);
  const f = layout.factors;
  let s = 0;
  for (let i = 0; i < it.length; i++) {
    for (let j = 0; j < it.length; j++) s += v(`b[${it[Math.min(i, j)]},${it[Math.max(i, j)]}]`) * Math.sqrt(p[i]! * p[j]!);
    let inner = 0;
    f.forEach((fk, k) => (inner += v(`c[${it[i]},${fk}]`) * z[k]!));
    for (let k = 0; k < layout.quadraticFactors; k++)
      for (let l = 0; l < layout.quadraticFactors; l++) inner += 0.5 * v(`g[${it[i]},${f[Math.min(k, l)]},${f[Math.max(k, l)]}]`) * z[k]! * z[l]!;
    s += p[i]! * inner;
  }
  return s;
}

const wellPosed = fc
  .record({
    form: fc.constantFrom<FormName>('normalized-quadratic', 'generalized-leontief'),
    n: fc.integer({ min: 2, max: 6 }),
    q: fc.integer({ min: 0, max: 2 }),
    trend: fc.boolean(),
    seed: fc.integer({ min: 1, max: 2 ** 30 }),
  })
  .chain(({ form, n, q, trend, seed }) => {
    const layout = layoutFor(form, n, q, trend);
    const k = layout.parameterNames.length;
    const m = layout.factors.length;
    return fc.record({
      layout: fc.constant(layout),
      theta: fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: k, maxLength: k }),
      prices: fc.array(fc.double({ min: 0.2, max: 20, noNaN: true }), { minLength: n, maxLength: n }),
      z: fc.array(fc.double({ min: 0.5, max: 10, noNaN: true }), { minLength: m, maxLength: m }),
      seed: fc.constant(seed),
    });
  });

const rel = (a: number, b: number, scale: number): number => Math.abs(a - b) / Math.max(scale, 1e-12);

describe('profit-function identities on random parameter sets (fast-check)', () => {
  it("Hotelling's lemma: ∂π/∂p_i equals the netput (and ∂π/∂z the shadow value)", () => {
    fc.assert(
      fc.property(wellPosed, ({ layout, theta, prices, z }) => {
        const form = formOf(layout.form);
        const profitOf = layout.form === 'normalized-quadratic' ? nqProfit : glProfit;
        const d = form.decompose(layout, theta, prices);
        const y = netputsFromDecomposition(d, z);
        const scale = Math.max(...y.map(Math.abs), 1);
        prices.forEach((_, i) => {
          const h = 1e-6 * prices[i]!;
          const up = prices.slice();
          const dn = prices.slice();
          up[i]! += h;
          dn[i]! -= h;
          const fd = (profitOf(layout, theta, up, z) - profitOf(layout, theta, dn, z)) / (2 * h);
          expect(rel(fd, y[i]!, scale)).toBeLessThan(1e-5);
        });
        const g = factorGradient(d, prices, z);
        z.forEach((_, k) => {
          const h = 1e-6 * Math.max(Math.abs(z[k]!), 1);
          const up = z.slice();
          const dn = z.slice();
          up[k]! += h;
          dn[k]! -= h;
          const fd = (profitOf(layout, theta, prices, up) - profitOf(layout, theta, prices, dn)) / (2 * h);
          expect(rel(fd, g[k]!, Math.max(Math.abs(g[k]!), scale))).toBeLessThan(1e-5);
        });
      }),
      { numRuns: 200, seed: 1201 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
  });

  it('symmetry and homogeneity: H = H′, H·p = 0, and H is the derivative of the netputs', () => {
    fc.assert(
      fc.property(wellPosed, ({ layout, theta, prices, z }) => {
        const form = formOf(layout.form);
        const H = form.priceHessian(layout, theta, prices);
        const hScale = Math.max(...H.flat().map(Math.abs), 1e-12);
        H.forEach((row, i) => {
          row.forEach((v, j) => expect(Math.abs(v - H[j]![i]!)).toBeLessThanOrEqual(1e-12 * hScale));
          const hp = row.reduce((s, v, j) => s + v * prices[j]!, 0);
          const pScale = row.reduce((s, v, j) => s + Math.abs(v * prices[j]!), 0);
          expect(Math.abs(hp)).toBeLessThanOrEqual(1e-12 * Math.max(pScale, 1e-300));
        });
        // finite-difference error is relative to the netputs' size, not the Hessian's
        const y0 = netputsFromDecomposition(form.decompose(layout, theta, prices), z);
        const fdScale = Math.max(hScale, Math.max(...y0.map(Math.abs)) / Math.max(...prices));
        prices.forEach((_, j) => {
          const h = 1e-6 * prices[j]!;
          const up = prices.slice();
          const dn = prices.slice();
          up[j]! += h;
          dn[j]! -= h;
          const yu = netputsFromDecomposition(form.decompose(layout, theta, up), z);
          const yd = netputsFromDecomposition(form.decompose(layout, theta, dn), z);
          yu.forEach((v, i) => expect(rel((v - yd[i]!) / (2 * h), H[i]![j]!, fdScale)).toBeLessThan(1e-5));
        });
      }),
      { numRuns: 200, seed: 1202 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
  });
});

// Random well-posed data: panels from a random convex NQ technology (own elasticities, correlation,
// noise and seed drawn by fast-check), fitted by each form.
const randomPanel = fc.record({
  seed: fc.integer({ min: 1, max: 2 ** 30 }),
  e: fc.tuple(fc.double({ min: 0.2, max: 0.8, noNaN: true }), fc.double({ min: 0.2, max: 0.8, noNaN: true }), fc.double({ min: 0.2, max: 0.8, noNaN: true })),
  rho: fc.double({ min: 0, max: 0.3, noNaN: true }),
  noise: fc.double({ min: 0.005, max: 0.03, noNaN: true }),
  form: fc.constantFrom<'nq' | 'gl'>('nq', 'gl'),
  trend: fc.boolean(),
  at: fc.tuple(fc.double({ min: 0.8, max: 1.25, noNaN: true }), fc.double({ min: 0.8, max: 1.25, noNaN: true })),
});

describe('fitted models satisfy the identities on random well-posed data (fast-check)', () => {
  it('symmetry identity, homogeneity and Hotelling on the fitted function', () => {
    fc.assert(
      fc.property(randomPanel, ({ seed, e, rho, noise, form, trend, at }) => {
        const items: SyntheticItem[] = [
          { name: 'grain', role: 'output', price: 200, quantity: 1000, ownElasticity: e[0] },
          { name: 'fert', role: 'input', price: 100, quantity: 300, ownElasticity: -e[1] },
          { name: 'fuel', role: 'input', price: 90, quantity: 200, ownElasticity: -e[2] },
          { name: 'misc', role: 'input', price: 100, quantity: 800 },
        ];
        const { dataset } = generateNqPanel({ items, rho, noise, farms: 6, seasons: 12, firstSeason: 2010, seed, withTrend: trend, priceSd: 0.1 });
        const fit = fitProfitFunction(dataset, { form, trend });
        const point = { prices: { grain: 200 * at[0], fert: 100 * at[1] } };
        const ev = evaluateFit(fit, point);
        const el = elasticitiesAt(fit, point);
        const p = ev.point.prices;
        const y = ev.netputs;
        el.elasticities.forEach((row, i) => {
          // homogeneity: every row sums to zero
          expect(Math.abs(row.reduce((a, b) => a + b, 0))).toBeLessThan(1e-9 * Math.max(...row.map(Math.abs), 1));
          // symmetry identity e_ji = e_ij·(p_i y_i)/(p_j y_j)
          row.forEach((eij, j) => {
            const eji = el.elasticities[j]![i]!;
            expect(Math.abs(eji - (eij * p[i]! * y[i]!) / (p[j]! * y[j]!))).toBeLessThan(1e-9 * Math.max(Math.abs(eji), 1));
          });
        });
        // Hotelling on the fitted profit function (profit evaluated through evaluateFit).
        fit.layout.items.forEach((it, i) => {
          const h = 1e-6 * p[i]!;
          const pu = evaluateFit(fit, { prices: { ...point.prices, [it.name]: p[i]! + h } }).profit;
          const pd = evaluateFit(fit, { prices: { ...point.prices, [it.name]: p[i]! - h } }).profit;
          expect(rel((pu - pd) / (2 * h), y[i]!, Math.max(...y.map(Math.abs)))).toBeLessThan(1e-6);
        });
      }),
      { numRuns: 24, seed: 1203 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
  });
});
