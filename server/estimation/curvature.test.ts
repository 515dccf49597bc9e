import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseNetputCsv } from './dataset.js';
import { fitProfitFunction } from './fit.js';
import { elasticitiesAt, evaluateFit } from './results.js';
import { generateNqPanel, type SyntheticItem } from './synthetic.js';

const fixtures = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'tests', 'fixtures', 'estimation');
const panel = parseNetputCsv(readFileSync(join(fixtures, 'nq-panel.csv'), 'utf8'));
const nqRef = JSON.parse(readFileSync(join(fixtures, 'systemfit-nq.json'), 'utf8')) as { coefficients: Record<string, number>; standardErrors: Record<string, number> };

// An invented panel whose symmetry-only NQ and GL estimates are not convex (one crop with a tiny
// own-price response, noisy quantities), so the Cholesky-constrained fit has to do the work.
const items: SyntheticItem[] = [
  { name: 'barley', role: 'output', price: 200, quantity: 1000, ownElasticity: 0.3 },
  { name: 'oats', role: 'output', price: 180, quantity: 500, ownElasticity: 0.02 },
  { name: 'seed', role: 'input', price: 50, quantity: 300, ownElasticity: -0.4 },
  { name: 'misc', role: 'input', price: 100, quantity: 800 },
];
const nonConvex = generateNqPanel({ items, farms: 5, seasons: 8, firstSeason: 2015, seed: 28, noise: 0.05, withTrend: false, priceSd: 0.1 }).dataset;

describe('convexity imposed by C = LL′ (the cone step of curvature.ts)', () => {
  it('when convexity does not bind, the constrained fit reproduces R systemfit to 6 significant digits', () => {
    // The LL′ path (the constrained step, Σ̂ iterated) must land on the same ML estimate as the
    // linear ITSUR when the unrestricted estimate is already convex (reference: systemfit-nq.json,
    // docs/sources.md §4).
    const fit = fitProfitFunction(panel, { trend: true, curvature: 'impose' });
    expect(fit.curvature.imposed).toBe(true);
    expect(fit.curvature.binding).toBe(false);
    expect(fit.converged).toBe(true);
    for (const c of fit.equations.flatMap((e) => e.coefficients)) {
      expect(Math.abs(c.estimate - nqRef.coefficients[c.name]!)).toBeLessThanOrEqual(5e-7 * Math.abs(nqRef.coefficients[c.name]!));
      expect(Math.abs(c.standardError - nqRef.standardErrors[c.name]!)).toBeLessThanOrEqual(5e-7 * nqRef.standardErrors[c.name]!);
    }
  });

  it('NQ: a non-convex estimate is re-estimated convex, reported, and is a constrained optimum', () => {
    const free = fitProfitFunction(nonConvex, { curvature: 'check' });
    expect(free.curvature.unrestrictedConvex).toBe(false);
    expect(free.curvature.imposed).toBe(false);
    expect(free.curvature.violationShare).toBe(1); // NQ curvature is global: every observation fails
    const fit = fitProfitFunction(nonConvex);
    expect(fit.curvature.imposed).toBe(true);
    expect(fit.curvature.convexAtMeans).toBe(true);
    expect(fit.curvature.violatingObservations).toBe(0);
    expect(fit.curvature.eigenvalues[0]!).toBeGreaterThanOrEqual(-1e-9 * fit.curvature.eigenvalues.at(-1)!);
    expect(fit.curvature.binding).toBe(true);
    expect(fit.converged).toBe(true);
    expect(fit.warnings.join(' ')).toMatch(/convexity binds/);
    // First-order (KKT) conditions of the constrained problem at the final Σ̂.
    const opt = fit.curvature.optimality!;
    expect(opt.stationarity).toBeLessThan(1e-6);
    expect(opt.dualMinEigenvalue).toBeGreaterThan(-1e-5);
    expect(Math.abs(opt.complementarity)).toBeLessThan(1e-5);
    // A constraint cannot raise the likelihood, and here it costs little.
    expect(fit.logLikelihood).toBeLessThanOrEqual(free.logLikelihood + 1e-9);
    expect(free.logLikelihood - fit.logLikelihood).toBeLessThan(2);
    const ev = evaluateFit(fit);
    expect(ev.convex).toBe(true);
    const el = elasticitiesAt(fit);
    for (const row of el.elasticities) expect(Math.abs(row.reduce((a, b) => a + b, 0))).toBeLessThan(1e-10);
  });

  it('GL: convexity is imposed at the sample-mean prices and checked at every observation', () => {
    const free = fitProfitFunction(nonConvex, { form: 'gl', curvature: 'check' });
    expect(free.curvature.unrestrictedConvex).toBe(false);
    const fit = fitProfitFunction(nonConvex, { form: 'gl' });
    expect(fit.curvature.imposed).toBe(true);
    expect(fit.curvature.global).toBe(false);
    expect(fit.curvature.convexAtMeans).toBe(true);
    expect(evaluateFit(fit).convex).toBe(true);
    expect(fit.warnings.join(' ')).toMatch(/sample-mean prices only/);
    // per-observation results are reported either way; a local imposition need not fix them all
    expect(fit.curvature.violatingObservations).toBeGreaterThanOrEqual(0);
    expect(fit.curvature.violatingObservations).toBeLessThanOrEqual(fit.observations);
    expect(fit.curvature.optimality!.stationarity).toBeLessThan(1e-6);
    expect(fit.curvature.optimality!.dualMinEigenvalue).toBeGreaterThan(-1e-5);
    expect(fit.logLikelihood).toBeLessThanOrEqual(free.logLikelihood + 1e-9);
  });

  it('monotonicity is reported per item as the share of wrong-signed fitted netputs', () => {
    const fit = fitProfitFunction(panel, { trend: true });
    expect(fit.monotonicity.map((m) => m.item)).toEqual(['wheat', 'canola', 'nitrogen', 'diesel', 'other']);
    for (const m of fit.monotonicity) {
      expect(m.share).toBe(m.violations / fit.observations);
      expect(m.violations).toBe(0); // this panel has outputs and inputs far from zero
    }
    expect(fit.monotonicityViolationShare).toBe(0);
  });
});
