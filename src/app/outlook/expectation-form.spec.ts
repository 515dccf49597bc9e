import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import type { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { ExpectationForm, FORM_DEFAULTS, formValueOf, settingFromForm } from './expectation-form';
import type { ExpectationSetting } from './outlook-api-types';

describe('settingFromForm', () => {
  it('should build the API setting of each method from the form fields', () => {
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, kind: 'moving-average', k: 5, olympic: true })).toEqual({
      ok: true,
      setting: { item: 'wheat', method: { kind: 'moving-average', k: 5, olympic: true }, band: { kind: 'errors', k: 1 } },
    });
    expect(settingFromForm('canola', { ...FORM_DEFAULTS, kind: 'adaptive', lambda: 0.3, bandKind: 'percent', bandPct: 12, note: ' smooth ' })).toEqual({
      ok: true,
      setting: { item: 'canola', method: { kind: 'adaptive', lambda: 0.3 }, band: { kind: 'percent', pct: 12 }, note: 'smooth' },
    });
    // An empty contract means "any recorded contract", which the API spells null.
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, kind: 'futures-basis', contract: '  ', basisSeasons: 3 })).toMatchObject({
      ok: true,
      setting: { method: { kind: 'futures-basis', contract: null, basisSeasons: 3 } },
    });
  });

  it("should answer with the API schema's own messages, at the field they name", () => {
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, kind: 'adaptive', lambda: 1.5 })).toEqual({ ok: false, errors: { lambda: 'λ must be at most 1' } });
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, kind: 'moving-average', k: 1 })).toEqual({ ok: false, errors: { k: 'Average at least 2 seasons' } });
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, kind: 'trend', seasons: 2 })).toEqual({ ok: false, errors: { seasons: 'A trend needs at least 3 seasons' } });
    expect(settingFromForm('diesel', { ...FORM_DEFAULTS, kind: 'manual', value: null, bandKind: 'percent' })).toEqual({ ok: false, errors: { value: 'Enter the expected price' } });
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, bandKind: 'percent', bandPct: 100 })).toEqual({ ok: false, errors: { bandPct: 'The percentage must be below 100' } });
  });

  it('should refuse what the server would refuse with 422: an error band on a manual figure, low above base', () => {
    expect(settingFromForm('diesel', { ...FORM_DEFAULTS, kind: 'manual', value: 1.1, bandKind: 'errors' })).toMatchObject({
      ok: false,
      errors: { bandKind: 'A manual figure has no history of errors; choose a percentage or set low and high' },
    });
    expect(settingFromForm('diesel', { ...FORM_DEFAULTS, kind: 'manual', value: 1.1, bandKind: 'manual', bandLow: 1.2, bandHigh: 1.3 })).toEqual({
      ok: false,
      errors: { bandLow: 'The low price must not be above the expected price' },
    });
    expect(settingFromForm('wheat', { ...FORM_DEFAULTS, bandKind: 'manual', bandLow: 200, bandHigh: 180 })).toEqual({
      ok: false,
      errors: { bandHigh: 'The high price must not be below the low price' },
    });
  });

  it('should read a stored setting back into the form', () => {
    const stored: ExpectationSetting = { item: 'wheat', method: { kind: 'futures-basis', contract: 'Sep milling wheat', basisSeasons: 4 }, band: { kind: 'manual', low: 190, high: 240 }, note: 'New-crop quote' };

    expect(formValueOf(stored)).toEqual({ ...FORM_DEFAULTS, kind: 'futures-basis', contract: 'Sep milling wheat', basisSeasons: 4, bandKind: 'manual', bandLow: 190, bandHigh: 240, note: 'New-crop quote' });
    // Without a band the server's default applies: past errors, or ±10 % for a manual figure.
    expect(formValueOf({ item: 'diesel', method: { kind: 'manual', value: 1.1 } })).toMatchObject({ kind: 'manual', value: 1.1, bandKind: 'percent', bandPct: 10 });
  });
});

describe('ExpectationForm', () => {
  let fixture: ComponentFixture<ExpectationForm>;
  let loader: HarnessLoader;
  let saved: ExpectationSetting[];

  beforeEach(async () => {
    TestBed.configureTestingModule({ providers: [provideZonelessChangeDetection()] });
    fixture = TestBed.createComponent(ExpectationForm);
    fixture.componentRef.setInput('item', 'wheat');
    fixture.componentRef.setInput('itemName', 'Wheat');
    fixture.componentRef.setInput('priceUnit', 'EUR/t');
    saved = [];
    fixture.componentInstance.saved.subscribe((s) => saved.push(s));
    loader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
  });

  const method = () => loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=kind]' }));
  const band = () => loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=bandKind]' }));
  const field = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  const inputOf = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
  const save = async () => (await loader.getHarness(MatButtonHarness.with({ text: 'Save expected price' }))).click();

  it("should start at last season's price with the band from past errors", async () => {
    expect(await (await method()).getValueText()).toBe("Last season's price");
    await save();

    expect(saved).toEqual([{ item: 'wheat', method: { kind: 'last' }, band: { kind: 'errors', k: 1 } }]);
  });

  it('should show the fields of the chosen method and emit a moving average of k seasons', async () => {
    await (await method()).clickOptions({ text: 'Moving average' });
    await (await inputOf('k')).setValue('4');
    await (await loader.getHarness(MatCheckboxHarness)).check();
    await save();

    expect(saved).toEqual([{ item: 'wheat', method: { kind: 'moving-average', k: 4, olympic: true }, band: { kind: 'errors', k: 1 } }]);
  });

  it('should show the schema message under λ and send nothing when λ is out of range', async () => {
    await (await method()).clickOptions({ text: 'Adaptive expectation' });
    await (await inputOf('lambda')).setValue('1.5');
    await save();

    expect(await (await field('Weight λ')).getTextErrors()).toEqual(['λ must be at most 1']);
    expect(saved).toEqual([]);
  });

  it('should move a manual figure off the error band and emit the figure with ±10 %', async () => {
    await (await method()).clickOptions({ text: 'Manual figure' });

    expect(await (await band()).getValueText()).toBe('Plus or minus a percentage');
    await save();
    expect(await (await field('Expected price')).getTextErrors()).toEqual(['Enter the expected price']);

    await (await inputOf('value')).setValue('1.25');
    await save();
    expect(saved).toEqual([{ item: 'wheat', method: { kind: 'manual', value: 1.25 }, band: { kind: 'percent', pct: 10 } }]);
  });

  it('should fill in a stored setting and apply a compared method without losing the band and note', async () => {
    fixture.componentRef.setInput('initial', { item: 'wheat', method: { kind: 'trend', seasons: 8 }, band: { kind: 'percent', pct: 15 }, note: 'Steady demand' });
    await fixture.whenStable();
    expect(await (await method()).getValueText()).toBe('Linear trend');
    expect(await (await inputOf('seasons')).getValue()).toBe('8');

    fixture.componentInstance.apply({ kind: 'adaptive', lambda: 0.7 });
    await fixture.whenStable();
    expect(await (await method()).getValueText()).toBe('Adaptive expectation');
    await save();
    expect(saved).toEqual([{ item: 'wheat', method: { kind: 'adaptive', lambda: 0.7 }, band: { kind: 'percent', pct: 15 }, note: 'Steady demand' }]);
  });

  it("should show the server's message about the method or the band where it belongs", async () => {
    fixture.componentRef.setInput('serverErrors', { method: 'Wheat: No futures quote is recorded for 2026/27' });
    await fixture.whenStable();
    const alerts = (fixture.nativeElement as HTMLElement).querySelectorAll('[role=alert]');

    expect([...alerts].map((a) => a.textContent?.trim())).toEqual(['Wheat: No futures quote is recorded for 2026/27']);
  });
});
