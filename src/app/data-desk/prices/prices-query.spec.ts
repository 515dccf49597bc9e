import { queryOf } from './prices-page';

describe('queryOf (the prices grid asks the server for sorted, narrowed windows)', () => {
  it('names the sort column and direction, and each column condition as comparison:value', () => {
    expect(
      queryOf([{ colId: 'price', sort: 'desc' }], {
        itemId: { filterType: 'text', type: 'contains', filter: 'whe' },
        deliveryPointId: { filterType: 'text', type: 'startsWith', filter: 'Ash' },
        source: { filterType: 'text', type: 'notContains', filter: 'bench' },
        price: { filterType: 'number', type: 'inRange', filter: 150, filterTo: 200.5 },
      }),
    ).toEqual({ sort: 'price', dir: 'desc', item: 'contains:whe', deliveryPoint: 'startsWith:Ash', source: 'notContains:bench', price: 'inRange:150:200.5' });
    expect(queryOf([], { seasonId: { filterType: 'text', type: 'equals', filter: '2024/25' }, price: { filterType: 'number', type: 'greaterThan', filter: 0.5 } })).toEqual({
      season: 'equals:2024/25',
      price: 'greaterThan:0.5',
    });
  });
  it('leaves out a sort the server does not know and an empty condition', () => {
    expect(queryOf([{ colId: 'per', sort: 'asc' }], { source: { filterType: 'text', type: 'contains', filter: '' } })).toEqual({});
    expect(queryOf([], null)).toEqual({});
  });
});
