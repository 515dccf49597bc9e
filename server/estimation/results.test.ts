import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseNetputCsv } from './dataset.js';
import { EstimationInputError } from './errors.js';
import { fitProfitFunction } from './fit.js';
import { deltaMethod, elasticitiesAt, evaluateFit, longRunResponse, shadowValues } from './results.js';

const fixtures = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'tests', 'fixtures', 'estimation');
const panel = parseNetputCsv(readFileSync(join(fixtures, 'nq-panel.csv'), 'utf8'));
const fit = fitProfitFunction(panel, { trend: true });
const gl = fitProfitFunction(panel, { trend: true, form: 'gl' });
const v = (name: string): number => fit.theta[fit.layout.parameterNames.indexOf(name)]!;

describe('evaluation, elasticities and shadow values', () => {
  it('NQ netputs, profit and shadow values follow the closed forms at a point', () => {
    // NQ (docs/profit-functions.md §2): y_i = a_i + Σ b_ij p̃_j + Σ c_ik z_k; π = p_n·π̃; ∂π/∂land = Σ_i c_i p_i + p_n (d + g·land).
    const point = { prices: { wheat: 280, diesel: 95 }, fixed: { land: 650, trend: 17 } };
    const ev = evaluateFit(fit, point);
    const [p, z] = [ev.point.prices, ev.point.fixed];
    const items = ['wheat', 'canola', 'nitrogen', 'diesel'];
    const pt = items.map((_, j) => p[j]! / p[4]!);
    items.forEach((it, i) => {
      let y = v(`a[${it}]`) + v(`c[${it},land]`) * z[0]! + v(`c[${it},trend]`) * z[1]!;
      items.forEach((_, j) => (y += v(`b[${items[Math.min(i, j)]},${items[Math.max(i, j)]}]`) * pt[j]!));
      expect(ev.netputs[i]).toBeCloseTo(y, 9);
    });
    expect(ev.profit).toBeCloseTo(p.reduce((s, pi, i) => s + pi * ev.netputs[i]!, 0), 6);
    const sv = shadowValues(fit, point);
    const land = items.reduce((s, it, i) => s + v(`c[${it},land]`) * p[i]!, 0) + p[4]! * (v('d[land]') + v('g[land,land]') * z[0]!);
    expect(sv[0]!.factor).toBe('land');
    expect(sv[0]!.value).toBeCloseTo(land, 8);
    expect(sv[0]!.standardError).toBeGreaterThan(0);
  });

  it('the delta method reproduces J V J′ for a linear function exactly', () => {
    // For f(θ) = w′θ the delta-method SE is √(w′Vw): a check of the numerical Jacobian.
    const w = fit.theta.map((_, j) => ((j % 3) - 1) * 0.5);
    const { standardErrors } = deltaMethod(fit, (th) => [th.reduce((s, t, j) => s + w[j]! * t, 0)]);
    const exact = Math.sqrt(w.reduce((s, wi, i) => s + wi * fit.covariance[i]!.reduce((t, vij, j) => t + vij * w[j]!, 0), 0));
    expect(Math.abs(standardErrors[0]! - exact)).toBeLessThan(1e-7 * exact);
  });

  it('delta-method elasticity SEs agree with a direct sandwich of the analytic NQ elasticity (i, j < n)', () => {
    // e_ij = b_ij p̃_j / y_i with y_i linear in θ: ∂e_ij/∂θ = (p̃_j/y_i)∂b_ij/∂θ − (e_ij/y_i)∂y_i/∂θ.
    const el = elasticitiesAt(fit);
    const p = el.point.prices;
    const z = el.point.fixed;
    const items = ['wheat', 'canola', 'nitrogen', 'diesel'];
    const names = fit.layout.parameterNames;
    const i = 0;
    const j = 2;
    const grad = new Array<number>(names.length).fill(0);
    const y = el.netputs[i]!;
    const e = el.elasticities[i]![j]!;
    const ptj = p[j]! / p[4]!;
    grad[names.indexOf(`b[wheat,nitrogen]`)]! += ptj / y;
    const dy = new Array<number>(names.length).fill(0);
    dy[names.indexOf('a[wheat]')] = 1;
    items.forEach((_, jj) => (dy[names.indexOf(`b[${items[Math.min(i, jj)]},${items[Math.max(i, jj)]}]`)]! += p[jj]! / p[4]!));
    dy[names.indexOf('c[wheat,land]')] = z[0]!;
    dy[names.indexOf('c[wheat,trend]')] = z[1]!;
    dy.forEach((d, k) => (grad[k]! -= (e / y) * d));
    const se = Math.sqrt(grad.reduce((s, gi, a) => s + gi * fit.covariance[a]!.reduce((t, vab, b) => t + vab * grad[b]!, 0), 0));
    expect(Math.abs(el.standardErrors[i]![j]! - se)).toBeLessThan(1e-6 * se);
  });
});

describe('long run: land adjusts to its rental rate (Le Chatelier)', () => {
  for (const [label, f] of [['NQ', fit], ['GL', gl]] as const) {
    it(`${label}: long-run own-price responses are at least as large as short-run ones`, () => {
      for (const rentalRates of [undefined, { land: 450 }, { land: 600 }]) {
        const lr = longRunResponse(f, rentalRates ? { rentalRates } : {});
        lr.items.forEach((_, i) => {
          const sr = lr.shortRun[i]![i]!;
          const lrr = lr.longRun[i]![i]!;
          expect(Math.abs(lrr)).toBeGreaterThanOrEqual(Math.abs(sr) - 1e-12);
          expect(Math.sign(lrr)).toBe(Math.sign(sr));
        });
        // At z* the land's shadow value equals its rental rate.
        const sv = shadowValues(f, { fixed: { land: lr.levels[0]! } });
        expect(sv[0]!.value).toBeCloseTo(lr.rentalRates[0]!, 6);
      }
    });
  }

  it('defaults to the shadow value at the point, so z* is the mean land and SR elasticities are the usual ones', () => {
    const lr = longRunResponse(fit);
    expect(lr.levels[0]).toBeCloseTo(fit.means.fixed[0]!, 8);
    const sr = elasticitiesAt(fit).elasticities;
    lr.shortRun.forEach((row, i) => row.forEach((e, j) => expect(e).toBeCloseTo(sr[i]![j]!, 10)));
  });

  it('long-run elasticities equal finite differences of y(p, z*(p)) at fixed rental rate', () => {
    const rent = 480;
    const base = longRunResponse(fit, { rentalRates: { land: rent } });
    fit.layout.items.forEach((item, j) => {
      const pj = fit.means.prices[j]!;
      const h = 1e-5 * pj;
      const up = longRunResponse(fit, { rentalRates: { land: rent }, point: { prices: { [item.name]: pj + h } } }).netputs;
      const dn = longRunResponse(fit, { rentalRates: { land: rent }, point: { prices: { [item.name]: pj - h } } }).netputs;
      base.netputs.forEach((y, i) => {
        const fd = ((up[i]! - dn[i]!) / (2 * h)) * (pj / y);
        expect(Math.abs(fd - base.longRun[i]![j]!)).toBeLessThan(1e-6 * Math.max(1, Math.abs(fd)));
      });
    });
  });

  it('refuses when profit is not concave in land', () => {
    const bent = { ...fit, theta: fit.theta.slice() };
    bent.theta[fit.layout.parameterNames.indexOf('g[land,land]')] = 0.01;
    expect(() => longRunResponse(bent)).toThrow(EstimationInputError);
    expect(() => longRunResponse(bent)).toThrow(/not concave in land/);
    expect(() => longRunResponse(fit, { rentalRates: { trend: 1 } })).toThrow(/"trend" is not a fixed factor that can adjust/);
  });
});
