import { TestBed } from '@angular/core/testing';
import { NonNullableFormBuilder } from '@angular/forms';
import { bookingProblems, defaultBooking, formValueFromStored, monthGroup, scenarioGroup, scenarioName, toBudgetInput, whereOf } from './budget-form';
import type { FertiliserProduct, ProductCopy, StoredInputs } from './budget-api-types';

// The demo list's urea and DAP (grades: Cornell NRCCA CA4 PO26 and UNL PASSEL, docs/sources.md §7; prices invented for the demo).
const list: FertiliserProduct[] = [
  { id: 1, name: 'Urea', nPct: 46, p2o5Pct: 0, k2oPct: 0, form: 'solid', pricePerT: 475, currency: 'EUR', lotT: 25, supplier: '', gradeSource: '', priceNote: '', active: true, updatedAt: '' },
  { id: 5, name: 'DAP', nPct: 18, p2o5Pct: 46, k2oPct: 0, form: 'solid', pricePerT: 650, currency: 'EUR', lotT: 25, supplier: '', gradeSource: '', priceNote: '', active: true, updatedAt: '' },
  { id: 7, name: 'Muriate of potash', nPct: 0, p2o5Pct: 0, k2oPct: 60, form: 'solid', pricePerT: 355, currency: 'EUR', lotT: 25, supplier: '', gradeSource: '', priceNote: '', active: true, updatedAt: '' },
];

const copy = (p: FertiliserProduct, changes: Partial<ProductCopy> = {}): ProductCopy => ({
  productId: p.id,
  name: p.name,
  nPct: p.nPct,
  p2o5Pct: p.p2o5Pct,
  k2oPct: p.k2oPct,
  form: p.form,
  pricePerT: p.pricePerT,
  currency: p.currency,
  lotT: p.lotT,
  supplier: p.supplier,
  gradeSource: p.gradeSource,
  priceNote: p.priceNote,
  ...changes,
});

const stored: StoredInputs = {
  source: { kind: 'model-run', runId: 3, prices: { nitrogen: 1.3 } },
  products: [copy(list[0]!), copy(list[1]!, { pricePerT: 640, priceNote: 'Budget quote' })],
  bookingPlan: {
    months: [
      { month: '2026-08', share: 1 / 3, prepay: true },
      { month: '2026-10', share: 2 / 3, prepay: false },
    ],
    prepayDiscountPct: 2.5,
    paymentTermsDays: 30,
    deliveryMonth: '2027-02',
    financingRatePct: 5,
  },
  scenarios: [{ name: 'N +20 %', priceChanges: { nitrogen: 20 }, productPriceChanges: { '5': 10 } }],
  options: { lotRule: 'whole-lots' },
};

describe('formValueFromStored and toBudgetInput', () => {
  it('should send a saved budget back unchanged when nothing was edited', () => {
    const { value, preserved } = formValueFromStored('Season plan', stored, list, 'metric');
    const input = toBudgetInput(value, 'metric', preserved)!;

    expect(input.source).toEqual({ kind: 'model-run', runId: 3, prices: { nitrogen: 1.3 } });
    // Urea at its list price stays a list product; DAP keeps its quote; potash was not chosen.
    expect(input.products).toEqual([{ productId: 1 }, { productId: 5, pricePerT: 640 }]);
    expect(input.bookingPlan.months.map((m) => m.share)).toEqual([expect.closeTo(1 / 3, 9), expect.closeTo(2 / 3, 9)]);
    expect(input.bookingPlan).toMatchObject({ prepayDiscountPct: 2.5, paymentTermsDays: 30, deliveryMonth: '2027-02', financingRatePct: 5 });
    expect(input.scenarios).toEqual([{ name: 'N +20 %', priceChanges: { nitrogen: 20 }, productPriceChanges: { '5': 10 } }]);
    expect(input.options).toEqual({ lotRule: 'whole-lots' });
  });

  it('should send a contracted-output source back as saved, with its pinned evaluation and named items', () => {
    for (const source of [
      { kind: 'contracted' as const, outlookId: 4 },
      { kind: 'contracted' as const, outlookId: 4, evaluationId: 17, items: { nitrogen: 'urea_n' } },
    ]) {
      const { value, preserved } = formValueFromStored('On contracts', { ...stored, source }, list, 'metric');
      expect(value.source).toMatchObject({ kind: 'contracted', contractOutlookId: 4, runId: null, outlookVersionId: null });
      expect(toBudgetInput(value, 'metric', preserved)!.source).toEqual(source);
    }
  });

  it('should offer the other listed products unticked, and mark a product gone from the list', () => {
    const gone = { ...stored, products: [...stored.products, { ...copy(list[2]!), productId: 99, name: 'Old blend' }] };
    const { value } = formValueFromStored('x', gone, list, 'metric');

    expect(value.products.map((p) => [p.name, p.include, p.gone])).toEqual([
      ['Urea', true, false],
      ['DAP', true, false],
      ['Old blend', false, true],
      ['Muriate of potash', false, false],
    ]);
  });
});

describe('bookingProblems', () => {
  it('should accept the starting pattern: 40 + 40 + 20 % before a February delivery, in the season calendar\'s input months', () => {
    // Default calendar: season 2027/28 begins with the 2027 harvest; its inputs are bought Aug 2026 – Mar 2027.
    const plan = defaultBooking(2027);
    expect(plan.months.map((m) => [m.month, m.sharePct, m.prepay])).toEqual([
      ['2026-08', 40, true],
      ['2026-10', 40, true],
      ['2027-01', 20, false],
    ]);
    expect(plan.deliveryMonth).toBe('2027-02');
    expect(bookingProblems(plan)).toEqual([]);
  });

  it('should say what is wrong with shares, order and delivery', () => {
    const plan = defaultBooking(2027);
    plan.months[2]!.sharePct = 10;
    plan.months[1]!.month = '2026-07';
    plan.deliveryMonth = '2026-12';

    expect(bookingProblems(plan)).toEqual([
      'The booked shares add up to 90 %; they must add up to 100 %.',
      'Booking month 2 (2026-07) must come after month 1 (2026-08).',
      'Delivery (2026-12) cannot come before the last booking month (2027-01).',
    ]);
  });
});

describe('whereOf', () => {
  it("should put the server's field paths in the page's words", () => {
    const products = ['Urea', 'DAP'];
    const scenarios = ['N +20 %'];

    expect(whereOf('body.bookingPlan.months.0.month', products, scenarios)).toBe('Booking plan, month 1');
    expect(whereOf('bookingPlan.months', products, scenarios)).toBe('Booking plan');
    expect(whereOf('bookingPlan.deliveryMonth', products, scenarios)).toBe('Booking plan, delivery month');
    expect(whereOf('products.1.productId', products, scenarios)).toBe('Products, DAP');
    expect(whereOf('body.scenarios.0.name', products, scenarios)).toBe('Scenario “N +20 %”');
    expect(whereOf('source.prices.urea', products, scenarios)).toBe('Demand source, expected price of urea');
    expect(whereOf('options.referencePrices.phosphate', products, scenarios)).toBe('Reference nutrient prices');
  });
});

describe('scenarioName', () => {
  it('should name a scenario by its price changes, one name for the same change to every nutrient', () => {
    expect(scenarioName({ nitrogen: 20, phosphate: null, potash: null })).toBe('N +20 %');
    expect(scenarioName({ nitrogen: 10, phosphate: null, potash: -5 })).toBe('N +10 %, K2O −5 %');
    // "All +10 %": one scenario, not a list that reads as three.
    expect(scenarioName({ nitrogen: 10, phosphate: 10, potash: 10 })).toBe('All nutrients +10 %');
    expect(scenarioName({ nitrogen: -15, phosphate: -15, potash: -15 })).toBe('All nutrients −15 %');
    expect(scenarioName({ nitrogen: 10, phosphate: 10, potash: 5 })).toBe('N +10 %, P2O5 +10 %, K2O +5 %');
    expect(scenarioName({ nitrogen: 0, phosphate: 0, potash: 0 })).toBe('No price change');
  });
});

describe('field checks from the server\'s schema (shared/budget-schemas.ts)', () => {
  it('should accept what the server accepts and refuse what it refuses, in its words', () => {
    const fb = TestBed.inject(NonNullableFormBuilder);
    const g = scenarioGroup(fb, { name: 'Crash', nitrogen: -99.995, phosphate: null, potash: 500 });
    // The server takes any change above −100 % (a hand copy used to stop at −99.99 %).
    expect(g.controls.nitrogen.valid).toBe(true);
    expect(g.controls.potash.valid).toBe(true);
    g.controls.nitrogen.setValue(-100);
    expect(g.controls.nitrogen.getError('schema')).toBe('A price change must be above −100 %');
    g.controls.potash.setValue(500.5);
    expect(g.controls.potash.getError('schema')).toBe('A price change above +500 % is not plausible');
    const m = monthGroup(fb, { month: '2026-08', sharePct: 0, prepay: true });
    expect(m.controls.sharePct.getError('schema')).toBe('A booked share must be above 0');
    m.controls.sharePct.setValue(100.5);
    expect(m.controls.sharePct.getError('schema')).toBe('A booked share is at most 1 (100 %)');
    m.controls.sharePct.setValue(0.001);
    expect(m.controls.sharePct.valid).toBe(true);
  });
});
