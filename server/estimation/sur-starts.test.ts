/**
 * Iterated SUR from two starts (docs/profit-functions.md §5). The SUR likelihood can have more than
 * one local maximum even in the bivariate model y1 = β1·x1 + e1, y2 = β2·x2 + e2 (Drton & Richardson
 * 2004, Biometrika 91(2): 383–392). The data below (six observations, drawn by our seeded generator
 * and searched for this property, invented) have two maxima; iterated SUR started at OLS stops at the
 * lower one.
 *
 * Outside reference: the global maximum of the concentrated log-likelihood −T/2·ln|Σ̂(β)| found by a
 * quasi-Newton (BFGS) minimiser, `numeric.uncmin` from the npm package `numeric` 1.2.6, started from
 * every point of a 13 × 13 grid over [−3, 3]²; nothing is shared with the engine.
 */
import numeric from 'numeric';
import { describe, expect, it } from 'vitest';
import { fitSur, fitSurTwoStarts, type SurEquationInput } from './sur.js';

const x1 = [0.762881, -0.646862, -1.137267, -1.070927, -0.276376, -1.806694];
const x2 = [0.67599, 0.322647, -1.7414, -0.291198, 1.226068, 0.06749];
const y1 = [0.148383, 0.514264, 1.191904, 1.463384, -2.151835, 0.665944];
const y2 = [0.389773, -0.653782, -0.867395, -0.674623, 0.351071, -1.077888];
const T = x1.length;
const equations: SurEquationInput[] = [
  { name: 'a', y: y1, regressors: [{ name: 'x', values: x1 }] },
  { name: 'b', y: y2, regressors: [{ name: 'x', values: x2 }] },
];
const options = { maxIterations: 5000, tolerance: 1e-12, residualCovariance: 'noDfCor' as const };

/** −T/2·ln|Σ̂(β)|, Σ̂ = E'E/T (the engine's divisor), written here from the definition. */
function concentrated(b: number[]): number {
  const e1 = y1.map((v, t) => v - b[0]! * x1[t]!);
  const e2 = y2.map((v, t) => v - b[1]! * x2[t]!);
  const s11 = (numeric.dot(e1, e1) as number) / T;
  const s22 = (numeric.dot(e2, e2) as number) / T;
  const s12 = (numeric.dot(e1, e2) as number) / T;
  return (-T / 2) * Math.log(s11 * s22 - s12 * s12);
}

function globalMaximum(): { beta: number[]; value: number } {
  let best = { beta: [0, 0], value: -Infinity };
  for (let i = 0; i <= 12; i++)
    for (let j = 0; j <= 12; j++) {
      const r = numeric.uncmin((b: number[]) => -concentrated(b), [-3 + i * 0.5, -3 + j * 0.5], 1e-12, undefined, 2000);
      const v = concentrated(r.solution);
      if (Number.isFinite(v) && v > best.value) best = { beta: r.solution, value: v };
    }
  return best;
}

describe('iterated SUR with a second start (likelihood with two maxima)', () => {
  const ref = globalMaximum();
  const plain = fitSur(equations, { ...options, method: 'SUR' });
  const two = fitSurTwoStarts(equations, options);

  it('from OLS alone it stops at the lower maximum (the reason for the second start)', () => {
    expect(plain.converged).toBe(true);
    expect(concentrated(plain.coefficients)).toBeLessThan(ref.value - 0.5);
  });

  it('the two-start fit keeps the global maximum found by BFGS (numeric.uncmin) from a grid of starts', () => {
    expect(two.starts.kept).toBe('reversed');
    expect(two.converged).toBe(true);
    expect(two.starts.fromReversed).toBeCloseTo(ref.value, 8);
    expect(concentrated(two.coefficients)).toBeCloseTo(ref.value, 8);
    expect(two.coefficients[0]).toBeCloseTo(ref.beta[0]!, 5);
    expect(two.coefficients[1]).toBeCloseTo(ref.beta[1]!, 5);
    expect(two.starts.fromOls).toBeCloseTo(concentrated(plain.coefficients), 8);
  });

  it('keeps the OLS start when both reach the same maximum (Kmenta-like single maximum)', () => {
    // a well-determined system: 40 observations of the same model with real correlation
    const n = 40;
    const u1 = Array.from({ length: n }, (_, t) => Math.sin(1.7 * t + 0.3));
    const u2 = Array.from({ length: n }, (_, t) => Math.cos(0.9 * t));
    const e1 = Array.from({ length: n }, (_, t) => 0.3 * Math.sin(3.1 * t));
    const e2 = e1.map((v, t) => 0.5 * v + 0.2 * Math.cos(2.3 * t + 1));
    const eqs: SurEquationInput[] = [
      { name: 'a', y: u1.map((v, t) => 2 * v + e1[t]!), regressors: [{ name: 'x', values: u1 }] },
      { name: 'b', y: u2.map((v, t) => -1 * v + e2[t]!), regressors: [{ name: 'x', values: u2 }] },
    ];
    const r = fitSurTwoStarts(eqs, options);
    const p = fitSur(eqs, { ...options, method: 'SUR' });
    expect(r.starts.kept).toBe('ols');
    expect(r.starts.fromReversed).toBeCloseTo(r.starts.fromOls, 8);
    expect(r.coefficients).toEqual(p.coefficients);
  });
});
