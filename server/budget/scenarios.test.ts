import { describe, expect, it } from 'vitest';
import { productPriceChangePct, referencePricesFromProducts, respondDemand, valueShares, type ElasticityMatrix } from './scenarios.js';

// Grades as docs/fertiliser.md §3 gives them (Cornell NRCCA CA4 PO26; UNL PASSEL; Virginia Tech SPES-201);
// prices per tonne invented for the test.
const g = (nPct: number, p2o5Pct: number, k2oPct: number, pricePerT: number) => ({ nPct, p2o5Pct, k2oPct, pricePerT });
const urea = g(46, 0, 0, 475);
const ammonia = g(82, 0, 0, 870);
const uan28 = g(28, 0, 0, 305);
const uan32 = g(32, 0, 0, 345);
const dap = g(18, 46, 0, 650);
const map = g(11, 52, 0, 690);
const mop = g(0, 0, 60, 355);
const all = [urea, ammonia, uan28, uan32, dap, map, mop];

const e: ElasticityMatrix = {
  nitrogen: { nitrogen: -0.4, phosphate: -0.05, potash: -0.03 },
  phosphate: { nitrogen: -0.05, phosphate: -0.5, potash: -0.08 },
  potash: { nitrogen: -0.03, phosphate: -0.08, potash: -0.55 },
};

describe('demand response to nutrient prices', () => {
  it('moves each demand by its own and cross elasticities (constant-elasticity form)', () => {
    // Nitrogen +20 %: N × 1.2^−0.4 = 0.929667, P2O5 × 1.2^−0.05 = 0.990925, K2O × 1.2^−0.03 (hand values by a calculator).
    const r = respondDemand({ nitrogen: 100_000, phosphate: 40_000, potash: 30_000 }, e, { nitrogen: 20 });
    expect(r.nitrogen).toBeCloseTo(92_966.72, 1);
    expect(r.phosphate).toBeCloseTo(39_637.01, 1);
    expect(r.potash / 30_000).toBeCloseTo(1.2 ** -0.03, 12);
    // Nitrogen −20 %: N × 0.8^−0.4 = 1.093362.
    expect(respondDemand({ nitrogen: 100_000, phosphate: 0, potash: 0 }, e, { nitrogen: -20 }).nitrogen).toBeCloseTo(109_336.21, 1);
  });

  it('with no elasticities, holds demand fixed', () => {
    expect(respondDemand({ nitrogen: 5, phosphate: 6, potash: 7 }, null, { nitrogen: 50 })).toEqual({ nitrogen: 5, phosphate: 6, potash: 7 });
  });

  it('refuses a price change of −100 % or less', () => {
    expect(() => respondDemand({ nitrogen: 1, phosphate: 1, potash: 1 }, e, { potash: -100 })).toThrow(/above −100 %/);
  });
});

describe('reference nutrient prices and product price changes', () => {
  it('prices N and K2O at the cheapest single-nutrient product, P2O5 at the cheapest residual net of N', () => {
    // N: min(475/460, 870/820, 305/280, 345/320) = 1.032609 (urea); K2O: 355/600 = 0.591667;
    // P2O5: DAP (650 − 180 × 1.032609)/460 = 1.008979 < MAP (690 − 110 × 1.032609)/520 = 1.108487.
    const r = referencePricesFromProducts(all);
    expect(r.nitrogen).toBeCloseTo(1.032609, 6);
    expect(r.potash).toBeCloseTo(0.591667, 6);
    expect(r.phosphate).toBeCloseTo(1.008979, 6);
  });

  it('a nitrogen price change moves urea fully and DAP and MAP by their N value shares', () => {
    const r = referencePricesFromProducts(all);
    // DAP: 180 × 1.032609 / 650 = 0.285953 of its value is N → +20 % N gives +5.7191 %.
    expect(valueShares(dap, r).nitrogen).toBeCloseTo(0.285953, 6);
    expect(productPriceChangePct(dap, r, { nitrogen: 20 })).toBeCloseTo(5.719064, 5);
    // MAP: 110 × 1.032609 / (110 × 1.032609 + 520 × 1.008979) = 0.177965 → +3.5593 %.
    expect(productPriceChangePct(map, r, { nitrogen: 20 })).toBeCloseTo(3.559291, 5);
    expect(productPriceChangePct(urea, r, { nitrogen: 20 })).toBeCloseTo(20, 12);
    expect(productPriceChangePct(mop, r, { nitrogen: 20 })).toBe(0);
    expect(productPriceChangePct(dap, r, { nitrogen: 20, phosphate: 20 })).toBeCloseTo(20, 12);
  });

  it('an explicit product price change overrides the nutrient rule', () => {
    expect(productPriceChangePct(dap, referencePricesFromProducts(all), { nitrogen: 20 }, -5)).toBe(-5);
  });
});
