import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { FarmSummary, Item, Season } from '../../../shared/api-types';
import { apiErrorInterceptor } from '../core/api-error-interceptor';
import { ModelForm, type ModelSaved } from './model-form';

const item = (id: number, code: string, name: string, role: Item['role'], category: Item['category'], unit: string): Item => ({
  id,
  code,
  name,
  role,
  category,
  unit,
  nPct: null,
  p2o5Pct: null,
  k2oPct: null,
});

// Invented demo items, seasons and farms.
const items: Item[] = [
  item(1, 'wheat', 'Wheat', 'output', 'grain', 't'),
  item(2, 'canola', 'Canola (rapeseed)', 'output', 'oilseed', 't'),
  item(3, 'nitrogen', 'Nitrogen (N)', 'input', 'fertiliser', 'kg N'),
  item(7, 'labour', 'Hired labour', 'input', 'labour', 'h'),
];
const seasons: Season[] = [
  { id: 1, label: '2020/21', startYear: 2020, startMonth: 7, startsOn: '2020-07-01' },
  { id: 2, label: '2021/22', startYear: 2021, startMonth: 7, startsOn: '2021-07-01' },
];
const farms: FarmSummary[] = [{ id: 1, code: 'F01', name: 'Hollybrook Farm', region: 'Riverlands', landHa: 271, members: [] }];

describe('ModelForm', () => {
  let fixture: ComponentFixture<ModelForm>;
  let http: HttpTestingController;
  let saved: ModelSaved[];

  beforeEach(async () => {
    TestBed.configureTestingModule({ providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([apiErrorInterceptor])),
        provideHttpClientTesting(),
      ], });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(ModelForm);
    fixture.componentRef.setInput('items', items);
    fixture.componentRef.setInput('seasons', seasons);
    fixture.componentRef.setInput('farms', farms);
    saved = [];
    fixture.componentInstance.saved.subscribe((s) => saved.push(s));
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  const el = () => fixture.nativeElement as HTMLElement;
  const button = (label: string) => [...el().querySelectorAll('button')].find((b) => b.textContent?.trim() === label)!;

  async function typeName(name: string) {
    const input = el().querySelector('input[formcontrolname="name"]') as HTMLInputElement;
    input.value = name;
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
  }

  it('should start with every item chosen and hired labour as numeraire, and post that definition on "Save and run"', async () => {
    await typeName('All items, NQ, land + trend');
    button('Save and run').click();
    await fixture.whenStable();

    const req = http.expectOne('/api/models');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({
      name: 'All items, NQ, land + trend',
      definition: {
        items: ['wheat', 'canola', 'nitrogen', 'labour'],
        numeraire: 'labour',
        fixedFactors: ['land_ha'],
        trend: true,
        form: 'nq',
        curvature: 'auto',
        fromSeason: null,
        toSeason: null,
        farms: null,
        backtestSeasons: 5,
        // Per hectare with farm and season effects: the default when land is chosen.
        spec: 'per-hectare',
      },
    });
    req.flush({ id: 9, name: 'All items, NQ, land + trend', definition: req.request.body.definition, createdBy: 2, createdAt: '2026-01-01T00:00:00Z', runs: [] });
    await fixture.whenStable();
    expect(saved.map((s) => [s.model.id, s.run])).toEqual([[9, true]]);
  });

  it('should forecast per hectare by default, and fall back to the pooled form without land', async () => {
    const radios = () => [...el().querySelectorAll('mat-radio-group[formcontrolname="spec"] mat-radio-button')];
    expect(radios().map((r) => r.textContent?.trim().split(' —')[0])).toEqual(['Per hectare, with farm and season effects', 'One equation for all farms (pooled)']);
    const land = [...el().querySelectorAll('mat-checkbox')].find((c) => c.textContent?.includes('Land farmed (ha)'))!;
    (land.querySelector('input') as HTMLInputElement).click();
    await fixture.whenStable();
    expect(radios()[0]!.querySelector('input')!.disabled).toBe(true);
    await typeName('No land');
    button('Save and run').click();
    await fixture.whenStable();
    const req = http.expectOne('/api/models');
    expect(req.request.body.definition.fixedFactors).toEqual([]);
    expect(req.request.body.definition.spec).toBe('pooled');
    req.flush({ id: 10, name: 'No land', definition: req.request.body.definition, createdBy: 2, createdAt: '2026-01-01T00:00:00Z', runs: [] });
    await fixture.whenStable();
  });

  it('should offer the other recorded fixed factors and send a chosen one after land', async () => {
    fixture.componentRef.setInput('factorNames', [{ factor: 'irrigated_ha', farms: 12, seasons: 9 }]);
    await fixture.whenStable();
    const box = [...el().querySelectorAll('mat-checkbox')].find((c) => c.textContent?.includes('irrigated_ha as a fixed factor'))!;
    expect(box.textContent).toContain('recorded for 12 farms in 9 seasons');
    (box.querySelector('input') as HTMLInputElement).click();
    await typeName('Land and irrigation');
    button('Save only').click();
    await fixture.whenStable();
    const req = http.expectOne('/api/models');
    expect(req.request.body.definition.fixedFactors).toEqual(['land_ha', 'irrigated_ha']);
    req.flush({ id: 10, name: 'Land and irrigation', definition: req.request.body.definition, createdBy: 2, createdAt: '2026-01-01T00:00:00Z', runs: [] });
    await fixture.whenStable();
  });

  it('should say what is wrong and send nothing when fewer than two items and no name are given', async () => {
    for (const label of ['Canola (rapeseed)', 'Nitrogen (N)', 'Hired labour']) {
      const box = [...el().querySelectorAll('mat-checkbox')].find((c) => c.textContent?.includes(label))!;
      (box.querySelector('input') as HTMLInputElement).click();
    }
    await fixture.whenStable();
    button('Save only').click();
    await fixture.whenStable();

    http.expectNone('/api/models');
    expect(el().textContent).toContain('Choose at least two items');
    expect(el().textContent).toContain('Name the model');
    expect(saved).toEqual([]);
  });

  it("should put the server's field message under the field it names", async () => {
    await typeName('Bad sample');
    button('Save only').click();
    await fixture.whenStable();
    http
      .expectOne('/api/models')
      .flush(
        { error: { code: 'invalid', message: 'Unknown season 1999/00', details: [{ path: 'body.definition.fromSeason', message: 'No such season' }] } },
        { status: 400, statusText: 'Bad Request' },
      );
    // Let the rejected request reach the form's catch block, then render.
    await new Promise((resolve) => setTimeout(resolve));
    await fixture.whenStable();
    expect(el().textContent).toContain('No such season');
    expect(saved).toEqual([]);
  });
});
