import { describe, expect, it } from 'vitest';
import { ols } from './ols.js';

/** |a − b| ≤ tol·|b| (relative), the comparison NIST StRD results are usually judged by. */
function expectRel(actual: number, expected: number, tol: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tol * Math.abs(expected));
}

// Sources and values: docs/sources.md §1 (NIST StRD linear regression).
describe('least-squares core against NIST StRD certified values', () => {
  it('reproduces Longley (higher difficulty) coefficients and SDs to 1e-9 relative', () => {
    // Source: NIST StRD "Longley" (Longley 1967, JASA 62:819-841); data and certified values as
    // copied in GSL multifit/test_longley.c and statsmodels results_regression.py (class Longley).
    const rows = [
      [60323, 83.0, 234289, 2356, 1590, 107608, 1947],
      [61122, 88.5, 259426, 2325, 1456, 108632, 1948],
      [60171, 88.2, 258054, 3682, 1616, 109773, 1949],
      [61187, 89.5, 284599, 3351, 1650, 110929, 1950],
      [63221, 96.2, 328975, 2099, 3099, 112075, 1951],
      [63639, 98.1, 346999, 1932, 3594, 113270, 1952],
      [64989, 99.0, 365385, 1870, 3547, 115094, 1953],
      [63761, 100.0, 363112, 3578, 3350, 116219, 1954],
      [66019, 101.2, 397469, 2904, 3048, 117388, 1955],
      [67857, 104.6, 419180, 2822, 2857, 118734, 1956],
      [68169, 108.4, 442769, 2936, 2798, 120445, 1957],
      [66513, 110.8, 444546, 4681, 2637, 121950, 1958],
      [68655, 112.6, 482704, 3813, 2552, 123366, 1959],
      [69564, 114.2, 502601, 3931, 2514, 125368, 1960],
      [69331, 115.7, 518173, 4806, 2572, 127852, 1961],
      [70551, 116.9, 554894, 4007, 2827, 130081, 1962],
    ];
    const y = rows.map((r) => r[0]!);
    const cols = [1, 2, 3, 4, 5, 6].map((j) => rows.map((r) => r[j]!));
    const fit = ols(cols, y);
    const certified = [
      [-3482258.63459582, 890420.383607373],
      [15.0618722713733, 84.9149257747669],
      [-0.358191792925910e-1, 0.334910077722432e-1],
      [-2.02022980381683, 0.488399681651699],
      [-1.03322686717359, 0.214274163161675],
      [-0.511041056535807e-1, 0.22607320006937],
      [1829.15146461355, 455.478499142212],
    ];
    certified.forEach(([b, sd], j) => {
      expectRel(fit.coefficients[j]!, b!, 1e-9);
      expectRel(fit.standardErrors[j]!, sd!, 1e-9);
    });
    // Certified residual SD and R² (NIST StRD Longley; R² as stored in statsmodels' Longley results).
    expectRel(fit.residualStandardDeviation, 304.854073561965, 1e-9);
    expectRel(fit.r2, 0.995479004577296, 1e-12);
    expectRel(fit.rss, 836424.055505915, 1e-9);
  });

  it('reproduces Norris (lower difficulty) to 1e-9 relative', () => {
    // Source: NIST StRD "Norris"; data as in GSL fit/test.c, certified values there and in KDE labplot FitTest.cpp.
    const x = [0.2, 337.4, 118.2, 884.6, 10.1, 226.5, 666.3, 996.3, 448.6, 777.0, 558.2, 0.4, 0.6, 775.5, 666.9, 338.0, 447.5, 11.6, 556.0, 228.1, 995.8, 887.6, 120.2, 0.3, 0.3, 556.8, 339.1, 887.2, 999.0, 779.0, 11.1, 118.3, 229.2, 669.1, 448.9, 0.5];
    const y = [0.1, 338.8, 118.1, 888.0, 9.2, 228.1, 668.5, 998.5, 449.1, 778.9, 559.2, 0.3, 0.1, 778.1, 668.8, 339.3, 448.9, 10.8, 557.7, 228.3, 998.0, 888.8, 119.6, 0.3, 0.6, 557.6, 339.3, 888.0, 998.5, 778.9, 10.2, 117.6, 228.9, 668.4, 449.2, 0.2];
    const fit = ols([x], y);
    expectRel(fit.coefficients[0]!, -0.262323073774029, 1e-9);
    expectRel(fit.coefficients[1]!, 1.00211681802045, 1e-9);
    expectRel(fit.standardErrors[0]!, 0.232818234301152, 1e-9);
    expectRel(fit.standardErrors[1]!, 0.429796848199937e-3, 1e-9);
    expectRel(fit.residualStandardDeviation, 0.884796396144373, 1e-9);
    expectRel(fit.r2, 0.999993745883712, 1e-12);
  });

  it('reproduces Pontius (x² up to 9e12) to 1e-9 relative', () => {
    // Source: NIST StRD "Pontius"; data as in GSL multifit/test_pontius.c, certified values there and in labplot.
    const loads = Array.from({ length: 20 }, (_, i) => 150000 * (i + 1));
    const x = [...loads, ...loads];
    const y = [0.11019, 0.21956, 0.32949, 0.43899, 0.54803, 0.65694, 0.76562, 0.87487, 0.98292, 1.09146, 1.20001, 1.30822, 1.41599, 1.52399, 1.63194, 1.73947, 1.84646, 1.95392, 2.06128, 2.16844, 0.11052, 0.22018, 0.32939, 0.43886, 0.54798, 0.65739, 0.76596, 0.87474, 0.983, 1.0915, 1.20004, 1.30818, 1.41613, 1.52408, 1.63159, 1.73965, 1.84696, 1.95445, 2.06177, 2.16829];
    const fit = ols([x, x.map((v) => v * v)], y);
    const certified = [
      [0.673565789473684e-3, 0.107938612033077e-3],
      [0.732059160401003e-6, 0.157817399981659e-9],
      [-0.316081871345029e-14, 0.486652849992036e-16],
    ];
    certified.forEach(([b, sd], j) => {
      expectRel(fit.coefficients[j]!, b!, 1e-9);
      expectRel(fit.standardErrors[j]!, sd!, 1e-9);
    });
    expectRel(fit.residualStandardDeviation, 0.205177424076185e-3, 1e-9);
  });
});
