import { describe, expect, it } from 'vitest';
import { computeBudget, type ResolvedSource } from './budget-compute.js';
import type { ProductCopy } from '../../shared/budget-types.js';
import { alignToNutrientPrices } from './scenarios.js';

// Grades as docs/fertiliser.md §3 gives them (Cornell NRCCA CA4 PO26: urea 46-0-0; UNL PASSEL:
// DAP 18-46-0; Virginia Tech SPES-201: muriate of potash 0-0-60). List prices and the outlook's
// nutrient prices are invented for the test; every expected value below is worked by hand.
const copy = (productId: number, name: string, grade: [number, number, number], pricePerT: number): ProductCopy => ({
  productId,
  name,
  nPct: grade[0],
  p2o5Pct: grade[1],
  k2oPct: grade[2],
  form: 'solid',
  pricePerT,
  currency: 'EUR',
  lotT: 1,
  supplier: '',
  gradeSource: '',
  priceNote: 'Invented',
});
const urea = copy(1, 'Urea', [46, 0, 0], 475); // 475 / 460 = 1.032609 EUR/kg N on the list
const dap = copy(2, 'DAP', [18, 46, 0], 650); // P2O5 net of its N: (650 − 180 × 1.032609) / 460 = 1.008979 EUR/kg
const mop = copy(3, 'Muriate of potash', [0, 0, 60], 355); // 355 / 600 = 0.591667 EUR/kg K2O

const bookingPlan = { months: [{ month: '2026-10', share: 1, prepay: false }], prepayDiscountPct: 0, paymentTermsDays: 30, deliveryMonth: '2027-02', financingRatePct: null };

/** An outlook whose low scenario is the squeeze (dear nutrients), as the co-op's outlook publishes it. */
function outlook(pricing: 'source' | 'list', sideBySide = true): ResolvedSource {
  const scenarios = [
    { name: 'low', demand: { nitrogen: 95_000, phosphate: 38_000, potash: 28_000 }, nutrientPrices: { nitrogen: 1.56, phosphate: 1.32, potash: 0.78 } },
    { name: 'base', demand: { nitrogen: 100_000, phosphate: 40_000, potash: 30_000 }, nutrientPrices: { nitrogen: 1.3, phosphate: 1.1, potash: 0.65 } },
    { name: 'high', demand: { nitrogen: 103_000, phosphate: 41_000, potash: 31_000 }, nutrientPrices: { nitrogen: 1.04, phosphate: 0.88, potash: 0.52 } },
  ];
  return {
    kind: 'outlook',
    demand: scenarios[1]!.demand,
    elasticities: null,
    elasticitySource: 'none',
    nutrientPrices: scenarios[1]!.nutrientPrices,
    detail: { scenario: 'base' },
    warnings: [],
    outlookScenarios: scenarios,
    pricing,
    sideBySide,
  };
}
const input = { currency: 'EUR', products: [urea, dap, mop], bookingPlan, scenarios: [], lotRule: 'round-up' as const };
const price = (r: ReturnType<typeof computeBudget>, scenario: string, name: string) => r.scenarios.find((s) => s.name === scenario)!.productPrices.find((p) => p.name === name)!.pricePerT;

describe('a budget built from an outlook scenario', () => {
  it('reprices the products so each nutrient costs the scenario\'s price per kg', () => {
    const a = alignToNutrientPrices([urea, dap, mop], { nitrogen: 1.3, phosphate: 1.1, potash: 0.65 });
    // Urea: 460 kg N × 1.30 = 598.00; DAP: 180 × 1.30 + 460 × 1.10 = 740.00; MOP: 600 × 0.65 = 390.00.
    expect(a.products.map((p) => p.pricePerT)).toEqual([expect.closeTo(598, 9), expect.closeTo(740, 9), expect.closeTo(390, 9)]);
    expect(a.gaps.find((g) => g.nutrient === 'nitrogen')!.gap).toBeCloseTo(1.3 - 475 / 460, 12); // +0.267391
  });

  it('puts low, base and high side by side, each at its own prices, so the squeeze costs more than the base', () => {
    const r = computeBudget(input, outlook('source'));
    expect(r.scenarios.map((s) => s.name)).toEqual(['Base', 'Outlook low', 'Outlook high']);
    expect(price(r, 'Base', 'Urea')).toBeCloseTo(598, 9);
    expect(price(r, 'Outlook low', 'Urea')).toBeCloseTo(460 * 1.56, 9); // 717.60
    expect(price(r, 'Outlook high', 'Urea')).toBeCloseTo(460 * 1.04, 9); // 478.40
    expect(price(r, 'Outlook low', 'DAP')).toBeCloseTo(180 * 1.56 + 460 * 1.32, 9); // 888.00
    // Each row buys the outlook's own demand for that scenario.
    expect(r.scenarios[1]!.demand).toEqual({ nitrogen: 95_000, phosphate: 38_000, potash: 28_000 });
    // N +20 % from the base (1.56 / 1.30).
    expect(r.scenarios[1]!.priceChanges.nitrogen).toBeCloseTo(20, 9);
    // Base: least cost buys P2O5 only as DAP (40 000 / 460 = 86.957 t, rounded up to 87 t, which carries 15 660 kg N),
    // the rest of the N as urea ((100 000 − 15 660) / 460 = 183.35 → 184 t), K2O as MOP (30 000 / 600 = 50 t):
    // 87 × 740 + 184 × 598 + 50 × 390 = 64 380 + 110 032 + 19 500 = 193 912 EUR.
    expect(r.scenarios[0]!.totals.cash).toBeCloseTo(193_912, 6);
    const [base, low] = [r.scenarios[0]!.totals.cash, r.scenarios[1]!.totals.cash];
    expect(low).toBeGreaterThan(base);
    expect(r.pricing).toMatchObject({ basis: 'outlook', scenario: 'base', sideBySide: ['Outlook low', 'Outlook high'] });
    expect(r.products.find((p) => p.name === 'Urea')).toMatchObject({ listPricePerT: 475, pricePerT: expect.closeTo(598, 9) });
    expect(r.warnings).toEqual([]);
  });

  it('at list prices, warns with the gap per kg of nutrient and moves the other scenarios by the outlook\'s own change', () => {
    const r = computeBudget(input, outlook('list'));
    expect(r.warnings).toContain(
      "The product list disagrees with the outlook: N 1.03 EUR/kg N on the product list, 1.30 in the outlook's base scenario (gap +0.27 EUR/kg N). This budget buys at the list prices",
    );
    expect(r.warnings).toContain(
      "The product list disagrees with the outlook: K2O 0.59 EUR/kg K2O on the product list, 0.65 in the outlook's base scenario (gap +0.06 EUR/kg K2O). This budget buys at the list prices",
    );
    expect(price(r, 'Base', 'Urea')).toBe(475);
    expect(price(r, 'Outlook low', 'Urea')).toBeCloseTo(475 * 1.2, 9); // N +20 % in the outlook → 570.00
    expect(r.scenarios[1]!.totals.cash).toBeGreaterThan(r.scenarios[0]!.totals.cash);
  });

  it('refuses a treasurer\'s scenario named like an outlook row', () => {
    expect(() => computeBudget({ ...input, scenarios: [{ name: 'Outlook low', priceChanges: {}, productPriceChanges: {} }] }, outlook('source'))).toThrow(/name yours otherwise/);
    expect(computeBudget({ ...input, scenarios: [{ name: 'Outlook low', priceChanges: {}, productPriceChanges: {} }] }, outlook('source', false)).scenarios.map((s) => s.name)).toEqual(['Base', 'Outlook low']);
  });
});
