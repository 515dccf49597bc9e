import { describe, expect, it } from 'vitest';
import { normalQuantile, studentTCdf, studentTQuantile } from './student-t.js';

// Reference values: SciPy 1.x `scipy.stats.t.ppf(p, df)` (Debian python3-scipy), printed to 16
// digits; the normal quantile from `scipy.stats.norm.ppf`.
const ref: [number, number, number][] = [
  // [df, p, quantile]
  [1, 0.95, 6.313751514675037],
  [2, 0.95, 2.9199855803537242],
  [2, 0.75, 0.8164965809277261],
  [2.5, 0.95, 2.5582186141359355],
  [2.5, 0.6, 0.2814595127485477],
  [3.7, 0.95, 2.1824938039146007],
  [5, 0.95, 2.0150483733330233],
  [10, 0.75, 0.6998120613124317],
  [30, 0.95, 1.697260886593957],
  [200, 0.6, 0.25368437919014747],
];

describe('Student t quantiles (docs/forecasting.md §6) against SciPy', () => {
  for (const [df, p, q] of ref)
    it(`t(${df}) ${p}-quantile = ${q}`, () => {
      expect(Math.abs(studentTQuantile(p, df) - q)).toBeLessThan(1e-9 * Math.abs(q));
      expect(studentTQuantile(1 - p, df)).toBeCloseTo(-studentTQuantile(p, df), 12);
      expect(studentTCdf(q, df)).toBeCloseTo(p, 11);
    });
  it('the normal limit: 1.6448536269514722 (scipy.stats.norm.ppf(0.95)), 0.6744897501960817 (0.75)', () => {
    expect(Math.abs(normalQuantile(0.95) - 1.6448536269514722)).toBeLessThan(2e-7);
    expect(Math.abs(normalQuantile(0.75) - 0.6744897501960817)).toBeLessThan(2e-7);
    expect(Math.abs(studentTQuantile(0.95, 1e9) - 1.6448536269514722)).toBeLessThan(2e-7);
  });
  it('refuses p outside (0, 1) and ν ≤ 0', () => {
    expect(() => studentTQuantile(1, 3)).toThrow(/p must lie/);
    expect(() => studentTQuantile(0.9, 0)).toThrow(/degrees of freedom/);
  });
});
