import { recordsBySeason } from './my-farm-overview';

describe('recordsBySeason', () => {
  it('should give one line per item, outputs first in the order the server sent them, with seasons newest first', () => {
    const table = recordsBySeason([
      { season: '2023/24', item: 'Wheat', role: 'output', unit: 't', quantity: 410 },
      { season: '2024/25', item: 'Wheat', role: 'output', unit: 't', quantity: 455.5 },
      { season: '2024/25', item: 'Nitrogen (N)', role: 'input', unit: 'kg N', quantity: 21000 },
      { season: '2024/25', item: 'Barley', role: 'output', unit: 't', quantity: 120 },
    ]);

    expect(table.seasons).toEqual(['2024/25', '2023/24']);
    expect(table.lines.map((l) => l.item)).toEqual(['Wheat', 'Barley', 'Nitrogen (N)']);
    expect(table.lines[0]?.bySeason).toEqual({ '2024/25': 455.5, '2023/24': 410 });
    expect(table.lines[2]?.bySeason['2023/24']).toBeUndefined();
  });

  it('should sort numbered seasons by number, not by text', () => {
    const table = recordsBySeason([
      { season: '999', item: 'Wheat', role: 'output', unit: 't', quantity: 1 },
      { season: '1000', item: 'Wheat', role: 'output', unit: 't', quantity: 2 },
    ]);

    expect(table.seasons).toEqual(['1000', '999']);
  });
});
