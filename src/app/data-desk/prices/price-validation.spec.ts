import type { PriceRow } from '../../../../shared/api-types';
import { priceEditProblems, withEdit } from './price-validation';

const row: PriceRow = {
  id: 7,
  version: 1,
  itemId: 1,
  itemCode: 'wheat',
  itemName: 'Wheat',
  unit: 't',
  seasonId: 19,
  season: '2024/25',
  deliveryPointId: 1,
  deliveryPoint: 'Larkfield terminal',
  price: 231.5,
  currency: 'EUR',
  source: 'Grain desk bid',
  observedOn: '2024-08-20',
};

describe('priceEditProblems', () => {
  it('should accept a plain new price', () => {
    expect(priceEditProblems(row, 'price', 240)).toBeNull();
  });

  it('should refuse a price of 0 or less, an emptied cell and a price beyond the largest kept', () => {
    expect(priceEditProblems(row, 'price', 0)).toEqual(['A price must be more than 0']);
    expect(priceEditProblems(row, 'price', -12.5)).toEqual(['A price must be more than 0']);
    expect(priceEditProblems(row, 'price', null)).toEqual(['Price is required']);
    expect(priceEditProblems(row, 'price', Number.NaN)).toEqual(['Price is required']);
    expect(priceEditProblems(row, 'price', 2e9)?.length).toBe(1);
  });

  it('should check currency, source and date with the shared schema', () => {
    expect(priceEditProblems(row, 'currency', 'usd')).toBeNull();
    expect(priceEditProblems(row, 'currency', 'EURO')).toEqual(['Use a three-letter ISO 4217 code such as EUR']);
    expect(priceEditProblems(row, 'source', '   ')).toEqual(['Source is required']);
    expect(priceEditProblems(row, 'observedOn', '2024-02-30')).toEqual(['Use a date such as 2024-08-15']);
    expect(priceEditProblems(row, 'observedOn', '2024-08-21')).toBeNull();
  });

  it('should refuse an edit that would give two rows the same item, season, point and date', () => {
    const twin: PriceRow = { ...row, id: 8, observedOn: '2024-08-21', price: 233 };
    expect(priceEditProblems(row, 'observedOn', '2024-08-21', [row, twin])).toEqual([
      'Wheat at Larkfield terminal on 2024-08-21 (2024/25) is already priced at 233 EUR; change that row instead',
    ]);
    expect(priceEditProblems(row, 'price', 250, [row, twin])).toBeNull();
  });
});

describe('withEdit', () => {
  it('should send the whole row with the one field changed, the currency upper-cased', () => {
    expect(withEdit(row, 'currency', ' usd ')).toEqual({
      itemId: 1,
      seasonId: 19,
      deliveryPointId: 1,
      price: 231.5,
      currency: 'USD',
      source: 'Grain desk bid',
      observedOn: '2024-08-20',
    });
  });
});
