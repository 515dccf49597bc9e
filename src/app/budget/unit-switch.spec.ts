import { provideZonelessChangeDetection, signal } from '@angular/core';
import { DEFAULT_SEASON_CALENDAR } from '../../../shared/season-calendar';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import type { CoopSettings } from '../../../shared/api-types';
import { SettingsStore } from '../core/settings-store';
import { convertFormUnits, productChoices, toBudgetInput, emptyPreserved, defaultBooking, type BudgetFormValue } from './budget-form';
import { BudgetUnitsStore, massToShown, pricePerTFromShown, pricePerTToShown, productFromShown, productToShown, unitLabels } from './budget-units';
import { UnitSwitch } from './unit-switch';

/*
 * Check values: 1 lb = 0.45359237 kg exactly (international yard and pound agreement, 1959) and
 * 1 short ton = 2000 lb (US customary), as recorded in docs/fertiliser.md §4. Derived from
 * these definitions [C]: 1000 kg = 1000 / 0.45359237 = 2204.622621848776 lb; 1 short ton =
 * 907.18474 kg, so 25 t = 25000 / 907.18474 = 27.5577828 (rounded) short tons and EUR 475/t = EUR 430.9127515/short ton.
 */

const settings: CoopSettings = { coopName: 'Demo', currency: 'EUR', unitSystem: 'metric', decimalMark: 'point', storageCapacityT: 1, handlingCapacityTPerDay: 1, seasonCalendar: DEFAULT_SEASON_CALENDAR };

describe('UnitSwitch', () => {
  beforeEach(() => {
    localStorage.removeItem('netput.budget.units');
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), { provide: SettingsStore, useValue: { settings: signal(settings) } }],
    });
  });

  it("should start from the co-op's unit system and switch to US units when chosen", async () => {
    const fixture = TestBed.createComponent(UnitSwitch);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const store = TestBed.inject(BudgetUnitsStore);
    await fixture.whenStable();

    const metric = await loader.getHarness(MatButtonToggleHarness.with({ text: 'Metric (kg, t)' }));
    const us = await loader.getHarness(MatButtonToggleHarness.with({ text: 'US (lb, short ton)' }));
    expect(await metric.isChecked()).toBe(true);
    expect(store.system()).toBe('metric');

    await us.check();

    expect(store.system()).toBe('us');
    expect(await us.isChecked()).toBe(true);
    expect(localStorage.getItem('netput.budget.units')).toBe('us');
  });

  it('should keep the choice for the next page, whatever the co-op setting', () => {
    localStorage.setItem('netput.budget.units', 'us');

    expect(TestBed.inject(BudgetUnitsStore).system()).toBe('us');
  });
});

describe('budget unit conversions', () => {
  it('should use the exact pound and short ton', () => {
    expect(massToShown(1000, 'us')).toBeCloseTo(2204.622621848776, 9);
    expect(productToShown(25, 'us')).toBeCloseTo(27.5577828, 6);
    expect(pricePerTToShown(475, 'us')).toBeCloseTo(430.9127515, 7);
    expect(productFromShown(productToShown(25, 'us'), 'us')).toBeCloseTo(25, 12);
    expect(pricePerTFromShown(pricePerTToShown(475, 'us'), 'us')).toBeCloseTo(475, 12);
    expect(massToShown(1000, 'metric')).toBe(1000);
  });

  it('should label figures in the system shown', () => {
    const us = unitLabels('us', 'EUR');
    const metric = unitLabels('metric', 'EUR');

    expect([us.mass, us.productPlural, us.pricePerProduct, us.nutrient('phosphate')]).toEqual(['lb', 'short tons', 'EUR/short ton', 'lb P2O5']);
    expect([metric.mass, metric.productPlural, metric.pricePerProduct, metric.nutrient('nitrogen')]).toEqual(['kg', 't', 'EUR/t', 'kg N']);
  });

  it('should re-express typed prices and amounts on a switch, so the same tonnes and prices are sent', () => {
    const value: BudgetFormValue = {
      name: 'Hand case',
      source: { kind: 'manual', outlookVersionId: null, outlookScenario: 'base', outlookPricing: 'outlook', sideBySide: true, runId: null, contractOutlookId: null, season: null, nitrogen: 100_000, phosphate: 46_000, potash: 30_000 },
      booking: defaultBooking(2027),
      scenarios: [],
      products: [
        { productId: 1, name: 'Urea', grade: '46-0-0', include: true, price: 475, lot: 25, listPricePerT: 475, listLotT: 25, gone: false },
        { productId: 5, name: 'DAP', grade: '18-46-0', include: true, price: 640, lot: 25, listPricePerT: 650, listLotT: 25, gone: false },
      ],
      lotRule: 'round-up',
    };
    const metricInput = toBudgetInput(value, 'metric', emptyPreserved())!;
    const shownInUs = { ...value, ...convertFormUnits(value, 'metric', 'us') };

    expect(shownInUs.source.nitrogen).toBeCloseTo(100_000 / 0.45359237, 6);
    expect(shownInUs.products[0]!.price).toBeCloseTo(430.9127515, 7);
    const usInput = toBudgetInput(shownInUs, 'us', emptyPreserved())!;
    expect(usInput.source).toEqual({ kind: 'manual', nKg: expect.closeTo(100_000, 6), p2o5Kg: expect.closeTo(46_000, 6), k2oKg: expect.closeTo(30_000, 6) });
    // Only the DAP quote differs from the list, in either unit system.
    expect(productChoices(shownInUs.products, 'us')).toEqual([{ productId: 1 }, { productId: 5, pricePerT: expect.closeTo(640, 9) }]);
    expect(metricInput.products).toEqual([{ productId: 1 }, { productId: 5, pricePerT: 640 }]);
    // Shares are typed in % and sent as fractions.
    expect(metricInput.bookingPlan.months.map((m) => m.share)).toEqual([0.4, 0.4, 0.2]);
  });
});
