import { describe, expect, it } from 'vitest';
import { fitSur, type SurEquationInput } from './sur.js';

// Kmenta data as shipped with R's systemfit (data/Kmenta.txt.gz, "partly contrived ... from
// Kmenta (1986), Table 13-1, p. 687"): consump, price, income, farmPrice, trend.
const kmenta = [
  [98.485, 100.323, 87.4, 98.0, 1], [99.187, 104.264, 97.6, 99.1, 2], [102.163, 103.435, 96.7, 99.1, 3],
  [101.504, 104.506, 98.2, 98.1, 4], [104.24, 98.001, 99.8, 110.8, 5], [103.243, 99.456, 100.5, 108.2, 6],
  [103.993, 101.066, 103.2, 105.6, 7], [99.9, 104.763, 107.8, 109.8, 8], [100.35, 96.446, 96.6, 108.7, 9],
  [102.82, 91.228, 88.9, 100.6, 10], [95.435, 93.085, 75.1, 81.0, 11], [92.424, 98.801, 76.9, 68.6, 12],
  [94.535, 102.908, 84.6, 70.9, 13], [98.757, 98.756, 90.6, 81.4, 14], [105.797, 95.119, 103.1, 102.3, 15],
  [100.225, 98.451, 105.1, 105.0, 16], [103.522, 86.498, 96.4, 110.5, 17], [99.929, 104.016, 104.4, 92.5, 18],
  [105.223, 105.769, 110.7, 89.3, 19], [106.232, 113.49, 127.1, 93.0, 20],
];
const col = (j: number) => Float64Array.from(kmenta, (r) => r[j]!);
const [consump, price, income, farmPrice, trend] = [0, 1, 2, 3, 4].map(col) as [Float64Array, Float64Array, Float64Array, Float64Array, Float64Array];
const one = new Float64Array(20).fill(1);

// system1 (systemfit tests/test_sur.R): demand consump ~ price + income; supply consump ~ price + farmPrice + trend
const system1: SurEquationInput[] = [
  { name: 'demand', y: consump, regressors: [{ name: '(Intercept)', values: one }, { name: 'price', values: price }, { name: 'income', values: income }] },
  { name: 'supply', y: consump, regressors: [{ name: '(Intercept)', values: one }, { name: 'price', values: price }, { name: 'farmPrice', values: farmPrice }, { name: 'trend', values: trend }] },
];
// system2: the supply equation is price ~ income + farmPrice + trend
const system2: SurEquationInput[] = [
  system1[0]!,
  { name: 'supply', y: price, regressors: [{ name: '(Intercept)', values: one }, { name: 'income', values: income }, { name: 'farmPrice', values: farmPrice }, { name: 'trend', values: trend }] },
];
// restrm[1,3] = 1, restrm[1,7] = -1: demand_income = supply_trend
const restriction = { matrix: [[0, 0, 1, 0, 0, 0, -1]] };

function expectAllRel(actual: number[], expected: number[], tol: number): void {
  expect(actual).toHaveLength(expected.length);
  expected.forEach((e, i) => expect(Math.abs(actual[i]! - e)).toBeLessThanOrEqual(tol * Math.abs(e)));
}

// Reference values: R systemfit 1.1-28 (Debian r-cran-systemfit), full precision as recorded in
// docs/sources.md §5 and agreeing with systemfit's stored tests/test_sur.Rout.save printout.
describe('general restricted SUR core against R systemfit on the Kmenta data', () => {
  it('fitsur1: one-step SUR, geomean Σ from OLS residuals', () => {
    const fit = fitSur(system1, { method: 'SUR' });
    expectAllRel(fit.coefficients, [99.332894239451008, -0.27548565907459, 0.298550465677071, 61.96616596629098, 0.146884098789821, 0.214003980258185, 0.339303944780721], 1e-9);
    expectAllRel(fit.standardErrors, [7.5144524814695819, 0.0885090750296271, 0.0419453573108065, 11.080790071483122, 0.0944350971928592, 0.0398683865823635, 0.067911273757894], 1e-9);
    expectAllRel(fit.sigmaUsed.flat(), [3.72539117373389, 4.13696272723222, 4.13696272723222, 5.78444113590756], 1e-12);
    expect(fit.names).toEqual(['demand_(Intercept)', 'demand_price', 'demand_income', 'supply_(Intercept)', 'supply_price', 'supply_farmPrice', 'supply_trend']);
  });

  it('fitsur2: one-step SUR with demand_income = supply_trend', () => {
    const fit = fitSur(system1, { method: 'SUR', restrictions: restriction });
    expectAllRel(fit.coefficients, [98.840761162403453, -0.239779925251783, 0.266981075207371, 67.428337583840332, 0.133216843805788, 0.179480868978308, 0.266981075207371], 1e-9);
    expectAllRel(fit.standardErrors, [7.5581367263030401, 0.0859934966857645, 0.0368424038251875, 10.6647166689842958, 0.095310009445711, 0.033653955561246, 0.0368424038251875], 1e-9);
  });

  it('fitsuri1: iterated SUR converges in 6 iterations', () => {
    const fit = fitSur(system2, { method: 'SUR', maxIterations: 100 });
    expect(fit.iterations).toBe(6);
    expectAllRel(fit.coefficients, [94.053728878876143, -0.235544632626805, 0.311718065402736, 89.298174931364215, 0.665484339702132, -0.474228956687088, -0.796644482316355], 1e-9);
    expectAllRel(fit.standardErrors, [7.4051218359554873, 0.088182340884276, 0.0457443563908763, 3.382236826120649, 0.0422982326704341, 0.0372401592080787, 0.0655695393028645], 1e-9);
  });

  it('fitsuri2: iterated SUR with the restriction converges in 21 iterations', () => {
    const fit = fitSur(system2, { method: 'SUR', maxIterations: 100, restrictions: restriction });
    expect(fit.iterations).toBe(21);
    expectAllRel(fit.coefficients, [107.367832634357285, -0.394459436334047, 0.338174249769924, 85.044826372625323, 0.312488382854966, -0.197207352310155, 0.338174249769924], 1e-9);
    expectAllRel(fit.standardErrors, [7.4985813565233652, 0.0911882058861719, 0.0466171810553282, 12.1068932509862339, 0.1233458201693731, 0.1157080952280912, 0.0466171810553281], 1e-9);
  });

  it('OLS step matches systemfit OLS estimates', () => {
    const fit = fitSur(system1, { method: 'OLS' });
    expectAllRel(fit.coefficients, [99.895422911508177, -0.31629880488661, 0.334635598189224, 58.275431201955641, 0.160366595700962, 0.248133294676691, 0.248302347253784], 1e-9);
  });
});
