import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runFitCli } from './cli.js';
import { parseNetputCsv } from './dataset.js';
import { fitProfitFunction } from './fit.js';

// Reference: R systemfit 1.1-28 (Debian r-cran-systemfit), run by
// tests/fixtures/estimation/systemfit-nq.R on tests/fixtures/estimation/nq-panel.csv (an invented
// panel; the reference values are systemfit's, not ours; docs/sources.md §4).
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const fixtures = join(root, 'tests', 'fixtures', 'estimation');
const csvPath = join(fixtures, 'nq-panel.csv');
interface Reference {
  iterations: number;
  coefficients: Record<string, number>;
  standardErrors: Record<string, number>;
  residCov: number[][];
  logLik: number;
}
const nqRef = JSON.parse(readFileSync(join(fixtures, 'systemfit-nq.json'), 'utf8')) as Reference;
const glRef = JSON.parse(readFileSync(join(fixtures, 'systemfit-gl.json'), 'utf8')) as Reference;

/** Agreement to 6 significant digits: |a − b| ≤ 5e-7·|b|. */
function expectSixDigits(actual: number, expected: number, what: string): void {
  expect(Math.abs(actual - expected), `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(5e-7 * Math.abs(expected));
}

describe('NQ netput system against R systemfit (SUR with symmetry restrictions)', () => {
  const fit = fitProfitFunction(parseNetputCsv(readFileSync(csvPath, 'utf8')), { trend: true });

  it('reproduces every coefficient and standard error to 6 significant digits', () => {
    const coefs = fit.equations.flatMap((e) => e.coefficients);
    expect(coefs.map((c) => c.name).sort()).toEqual(Object.keys(nqRef.coefficients).sort());
    for (const c of coefs) {
      expectSixDigits(c.estimate, nqRef.coefficients[c.name]!, c.name);
      expectSixDigits(c.standardError, nqRef.standardErrors[c.name]!, `SE ${c.name}`);
    }
  });

  it('reproduces the residual covariance (divisor T) and the log-likelihood', () => {
    fit.sigma.forEach((row, i) => row.forEach((v, j) => expectSixDigits(v, nqRef.residCov[i]![j]!, `sigma[${i}][${j}]`)));
    expectSixDigits(fit.logLikelihood, nqRef.logLik, 'logLik');
    expect(fit.converged).toBe(true);
    expect(fit.curvature.imposed).toBe(false);
  });

  it('the fit command prints the same estimates (same code path as the API)', () => {
    const r = runFitCli(['--input', csvPath, '--trend']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout) as { coefficients: { name: string; estimate: number; standardError: number }[]; observations: number; numeraire: string };
    expect(doc.observations).toBe(128);
    expect(doc.numeraire).toBe('other');
    for (const c of doc.coefficients) {
      expectSixDigits(c.estimate, nqRef.coefficients[c.name]!, c.name);
      expectSixDigits(c.standardError, nqRef.standardErrors[c.name]!, `SE ${c.name}`);
    }
  });

  it('npm run fit, as a separate process, reproduces the reference', () => {
    const out = execFileSync('npm', ['run', '--silent', 'fit', '--', '--input', csvPath, '--trend'], { cwd: root, encoding: 'utf8' });
    const doc = JSON.parse(out) as { coefficients: { name: string; estimate: number }[] };
    for (const c of doc.coefficients) expectSixDigits(c.estimate, nqRef.coefficients[c.name]!, c.name);
  }, 30000);
});

describe('generalized Leontief netput system against R systemfit', () => {
  const fit = fitProfitFunction(parseNetputCsv(readFileSync(csvPath, 'utf8')), { trend: true, form: 'gl', curvature: 'check' });

  it('reproduces every coefficient and standard error to 6 significant digits', () => {
    // Our regressor s_<j> in the equation of item i is systemfit's s_<i>_<j>.
    const coefs = fit.equations.flatMap((e) => e.coefficients.map((c) => ({ ...c, name: c.name.replace(/^([^_]+)_s_/, `$1_s_$1_`) })));
    expect(coefs.map((c) => c.name).sort()).toEqual(Object.keys(glRef.coefficients).sort());
    for (const c of coefs) {
      expectSixDigits(c.estimate, glRef.coefficients[c.name]!, c.name);
      expectSixDigits(c.standardError, glRef.standardErrors[c.name]!, `SE ${c.name}`);
    }
    expectSixDigits(fit.logLikelihood, glRef.logLik, 'logLik');
  });
});
