import { parseTable, problemsFromServer, readIndexValues, readPastedPrices } from './paste';
import { testLookups } from './test-lookups';

const defaults = { currency: 'EUR', source: '' };

describe('parseTable', () => {
  it('should split spreadsheet cells on tabs, keeping a quoted cell with a tab and a line break whole', () => {
    const text = 'wheat\t2024/25\t231.5\r\n"Grain desk,\tlate\nbid"\tx\t\r\n\r\n';
    expect(parseTable(text)).toEqual([
      ['wheat', '2024/25', '231.5'],
      ['Grain desk,\tlate\nbid', 'x', ''],
    ]);
  });

  it('should read a pasted CSV (no tabs) on the delimiter it finds', () => {
    expect(parseTable('item;season;price\nwheat;2024/25;231.5')).toEqual([
      ['item', 'season', 'price'],
      ['wheat', '2024/25', '231.5'],
    ]);
  });

  it('should answer no rows for blank text', () => {
    expect(parseTable('  \n\t\n')).toEqual([]);
  });
});

describe('readPastedPrices', () => {
  it('should read a block without a header in the documented column order', () => {
    const read = readPastedPrices(parseTable('wheat\t2024/25\tLarkfield terminal\t231.5\tEUR\tGrain desk bid\t2024-08-20'), testLookups(), defaults);
    expect(read.hasHeader).toBe(false);
    expect(read.problems).toEqual([]);
    expect(read.validRows).toEqual([
      { itemId: 1, seasonId: 19, deliveryPointId: 1, price: 231.5, currency: 'EUR', source: 'Grain desk bid', observedOn: '2024-08-20' },
    ]);
  });

  it('should map columns by header, take names or codes and fill the currency and source defaults', () => {
    const text = ['Observed on\tPrice (EUR/t)\tItem\tSeason\tDelivery point', '2024-10-01\t1.18\tNitrogen (N)\t2024\tco-op  input depot'].join('\n');
    const read = readPastedPrices(parseTable(text), testLookups(), { currency: 'EUR', source: 'Input price list' });
    expect(read.hasHeader).toBe(true);
    expect(read.problems).toEqual([]);
    expect(read.validRows).toEqual([
      { itemId: 3, seasonId: 19, deliveryPointId: 4, price: 1.18, currency: 'EUR', source: 'Input price list', observedOn: '2024-10-01' },
    ]);
  });

  it('should read decimal commas and the unit as the grid shows it (EUR/t) in a decimal-comma co-op, and refuse 2O4,5', () => {
    const text = ['item;season;delivery point;price;unit;observed on', 'wheat;2024/25;Larkfield terminal;204,5;EUR/t;14/08/2024', 'wheat;2024/25;Larkfield terminal;2O4,5;EUR/t;2024-08-15'].join('\n');
    const read = readPastedPrices(parseTable(text), testLookups(), { currency: 'EUR', source: 'Bids', decimalMark: 'comma' });
    expect(read.validRows).toEqual([{ itemId: 1, seasonId: 19, deliveryPointId: 1, price: 204.5, currency: 'EUR', source: 'Bids', observedOn: '2024-08-14' }]);
    expect(read.problems).toEqual([{ row: 3, column: 'Price', message: '"2O4,5" is not a number: it has the letter "O" in it' }]);
  });

  it('should list every bad cell with its line and column, in the words of the import', () => {
    const text = [
      'item\tseason\tdelivery point\tprice\tunit\tcurrency\tsource\tobserved on',
      'wheat\t2024/25\tLarkfield terminal\t12,5\tt\tEUR\tbid\t2024-08-20',
      'barley\t2031/32\tDover quay\t190\tt\tEUR\tbid\t2024-08-20',
      'nitrogen\t2024/25\tCo-op input depot\t1.18\tkg\teuro\tlist\t01/10/2024',
      'wheat\t2024/25\tLarkfield terminal\t-3\tt\tEUR\tbid\t2024-08-21',
      'wheat\t2024/25\tLarkfield terminal\t\tt\tEUR\t\t2024-08-22',
    ].join('\n');
    const read = readPastedPrices(parseTable(text), testLookups(), defaults);
    expect(read.validRows).toEqual([]);
    expect(read.problems).toEqual([
      {
        row: 2,
        column: 'Price',
        message: '"12,5" is written with a decimal comma (1234,5), but this co-op writes numbers with a decimal point (1234.5); it was not read (the decimal mark is a co-op setting, and an import can choose its own)',
      },
      { row: 3, column: 'Item', message: 'unknown item "barley" (items: wheat, nitrogen, diesel)' },
      { row: 3, column: 'Season', message: 'unknown season "2031/32"' },
      { row: 3, column: 'Delivery point', message: 'unknown delivery point "Dover quay" (delivery points: Larkfield terminal, Co-op input depot)' },
      { row: 4, column: 'Unit', message: `unit "kg" is not nitrogen's unit "kg N"; nitrogen prices are per kg N` },
      { row: 4, column: 'Currency', message: '"euro" is not a currency code: use three letters such as EUR' },
      { row: 4, column: 'Observed on', message: '"01/10/2024" is ambiguous (day/month or month/day?): write dates as YYYY-MM-DD' },
      { row: 5, column: 'Price', message: 'A price must be more than 0' },
      { row: 6, column: 'Price', message: 'empty cell: price is required' },
      { row: 6, column: 'Source', message: 'empty cell: name the source of the price (or give one for the whole block)' },
    ]);
  });

  it('should flag a line that repeats an earlier one, and an ignored header', () => {
    const line = 'wheat\t2024/25\tLarkfield terminal\t231.5\tEUR\tbid\t2024-08-20';
    const read = readPastedPrices(parseTable(`${line}\n${line}`), testLookups(), defaults);
    expect(read.validRows).toHaveLength(1);
    expect(read.problems).toEqual([{ row: 2, column: null, message: 'the line repeats line 1 (same item, season, delivery point and observed date)' }]);

    const header = readPastedPrices(parseTable('item\tseason\tnotes\nwheat\t2024/25\tx'), testLookups(), defaults);
    expect(header.problems.slice(0, 4)).toEqual([
      { row: 1, column: 'notes', message: 'the column "notes" is not one the prices use; it is ignored' },
      { row: 1, column: null, message: 'no column is headed delivery point' },
      { row: 1, column: null, message: 'no column is headed price' },
      { row: 1, column: null, message: 'no column is headed observed on' },
    ]);
  });

  it('should turn the server’s row paths back into pasted lines', () => {
    const read = readPastedPrices(parseTable('item\tseason\tdelivery point\tprice\tsource\tobserved on\nwheat\t2024/25\tLarkfield terminal\t231.5\tbid\t2024-08-20'), testLookups(), defaults);
    expect(problemsFromServer([{ path: 'body.rows.0.source', message: 'Name the source' }], read.rows)).toEqual([
      { row: 2, column: 'Source', message: 'Name the source' },
    ]);
  });
});

describe('readIndexValues', () => {
  it('should read season and value lines after a header, and list bad lines', () => {
    const read = readIndexValues(parseTable('season,value\n2023/24,100\n2024,103.2\n2031/32,110\n2023/24,99\n2024/25,0'), testLookups());
    expect(read.values).toEqual([
      { seasonId: 18, value: 100 },
      { seasonId: 19, value: 103.2 },
    ]);
    expect(read.problems).toEqual([
      { row: 4, column: 'Season', message: 'unknown season "2031/32"' },
      { row: 5, column: 'Season', message: '2023/24 is given twice (line 2 and line 5)' },
      { row: 6, column: 'Value', message: '"0" is not an index value: it must be more than 0' },
    ]);
  });
});
