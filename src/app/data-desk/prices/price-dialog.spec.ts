import { TestBed } from '@angular/core/testing';
import { FormControl } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import type { Item, PriceRow, Season } from '../../../../shared/api-types';
import type { PriceInput } from '../../../../shared/data-schemas';
import { DataDeskApi } from '../data-desk-api';
import type { Lookups } from '../reference-store';
import { PriceDialog, priceTextValidator, type PriceDialogData } from './price-dialog';

const wheat = { id: 1, code: 'wheat', name: 'Wheat', unit: 't', role: 'output', category: 'grain' } as Item;
const season = { id: 3, label: '2024/25', startYear: 2024, startMonth: 7 } as Season;
const point = { id: 2, name: 'Larkfield terminal', kind: 'delivery point', region: 'North' };
const lookups = {
  items: [wheat],
  seasons: [season],
  deliveryPoints: [point],
  itemById: new Map([[1, wheat]]),
  seasonById: new Map([[3, season]]),
  deliveryPointById: new Map([[2, point]]),
} as unknown as Lookups;

describe('priceTextValidator (the add-price dialog reads prices as the grid does)', () => {
  const check = (text: string, mark: 'point' | 'comma') => priceTextValidator(() => mark)(new FormControl(text));
  it('reads 204,5 under a decimal comma and refuses it under a decimal point, naming the setting', () => {
    expect(check('204,5', 'comma')).toBeNull();
    expect(check('204.5', 'point')).toBeNull();
    expect(check('204,5', 'point')?.['schema']).toMatch(/^"204,5".*\(the co-op writes a decimal point \(1234\.5\)\)$/);
    expect(check('1.234', 'comma')?.['schema']).toContain('the co-op writes a decimal comma (1234,5)');
  });
  it('refuses a letter O for a zero and a price that is not above 0 with the shared words', () => {
    expect(check('2O4,5', 'comma')?.['schema']).toContain('the letter "O"');
    expect(check('-5', 'point')?.['schema']).toBeTruthy();
    expect(check('', 'point')).toBeNull();
  });
});

describe('PriceDialog', () => {
  async function open(decimalMark: 'point' | 'comma') {
    const sent: PriceInput[][] = [];
    const closed: unknown[] = [];
    const data: PriceDialogData = { lookups, currency: 'EUR', decimalMark, existing: [] };
    TestBed.configureTestingModule({
      imports: [PriceDialog],
      providers: [
        { provide: MAT_DIALOG_DATA, useValue: data },
        { provide: MatDialogRef, useValue: { close: (v: unknown) => closed.push(v) } },
        {
          provide: DataDeskApi,
          useValue: {
            createPrices: async (rows: PriceInput[]) => {
              sent.push(rows);
              return rows.map((r, i) => ({ ...r, id: 100 + i }) as unknown as PriceRow);
            },
          },
        },
      ],
    });
    const fixture = TestBed.createComponent(PriceDialog);
    fixture.detectChanges();
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const component = fixture.componentInstance as unknown as { form: PriceDialog['form' & keyof PriceDialog]; save(): Promise<void> };
    return { fixture, el, component, sent, closed };
  }

  it('under a decimal comma, a typed 204,5 is stored as 204.5 (a text field, not the browser number input)', async () => {
    const d = await open('comma');
    const input = d.el.querySelector<HTMLInputElement>('input[formcontrolname="price"]')!;
    expect(input.type).toBe('text');
    expect(input.placeholder).toBe('204,50');
    const form = (d.fixture.componentInstance as unknown as { form: { patchValue(v: object): void } }).form;
    form.patchValue({ itemId: 1, seasonId: 3, deliveryPointId: 2, source: 'Bid sheet', observedOn: '2024-08-20' });
    input.value = '204,5';
    input.dispatchEvent(new Event('input'));
    await (d.fixture.componentInstance as unknown as { save(): Promise<void> }).save();
    expect(d.sent).toEqual([[{ itemId: 1, seasonId: 3, deliveryPointId: 2, price: 204.5, currency: 'EUR', source: 'Bid sheet', observedOn: '2024-08-20' }]]);
    expect(d.closed).toHaveLength(1);
  });

  it('under a decimal point, 204,5 is refused with the reason and nothing is sent', async () => {
    const d = await open('point');
    const input = d.el.querySelector<HTMLInputElement>('input[formcontrolname="price"]')!;
    const form = (d.fixture.componentInstance as unknown as { form: { patchValue(v: object): void } }).form;
    form.patchValue({ itemId: 1, seasonId: 3, deliveryPointId: 2, source: 'Bid sheet', observedOn: '2024-08-20' });
    input.value = '204,5';
    input.dispatchEvent(new Event('input'));
    await (d.fixture.componentInstance as unknown as { save(): Promise<void> }).save();
    d.fixture.detectChanges();
    expect(d.sent).toEqual([]);
    expect(d.el.textContent).toContain('the co-op writes a decimal point');
  });
});
