import type { FarmRecordRow } from '../../../shared/api-types';
import { TEST_ITEMS, TEST_SEASONS } from '../data-desk/test-lookups';
import { pivotRecords, quantityDoubt, recordCellProblem, type SeasonRow } from './records-pivot';

const record = (seasonId: number, itemId: number, quantity: number): FarmRecordRow => ({
  farmId: 1,
  version: 1,
  farmCode: 'F01',
  seasonId,
  season: TEST_SEASONS.find((s) => s.id === seasonId)!.label,
  itemId,
  itemCode: TEST_ITEMS.find((i) => i.id === itemId)!.code,
  itemName: '',
  role: 'output',
  unit: '',
  quantity,
});

describe('pivotRecords', () => {
  it('should give every season a row, newest first, with land and a cell per item (null where nothing is recorded)', () => {
    const rows = pivotRecords(TEST_SEASONS, TEST_ITEMS, [record(19, 1, 1124), record(19, 3, 44928), record(18, 1, 1311.2)], [
      { farmId: 1, farmCode: 'F01', seasonId: 19, season: '2024/25', landHa: 270.2 },
    ]);
    expect(rows).toEqual([
      { seasonId: 19, season: '2024/25', startYear: 2024, landHa: 270.2, i1: 1124, i3: 44928, i6: null },
      { seasonId: 18, season: '2023/24', startYear: 2023, landHa: null, i1: 1311.2, i3: null, i6: null },
    ]);
  });
});

describe('recordCellProblem', () => {
  it('should accept 0 and more for quantities, and an emptied quantity (it removes the record)', () => {
    expect(recordCellProblem('quantity', 0)).toBeNull();
    expect(recordCellProblem('quantity', '12.5')).toBeNull();
    expect(recordCellProblem('quantity', null)).toBeNull();
    expect(recordCellProblem('quantity', -1)).toBe('A quantity cannot be negative (inputs are recorded as positive amounts used)');
    expect(recordCellProblem('quantity', '12,5')).toBe('"12,5" is not a number: write it with a point for decimals');
  });

  it('should want more than 0 ha of land, and never an empty land cell', () => {
    expect(recordCellProblem('land', 270.2)).toBeNull();
    expect(recordCellProblem('land', 0)).toBe('Land must be more than 0 ha');
    expect(recordCellProblem('land', null)).toBe('Land cannot be left empty: enter the hectares farmed that season');
  });
});

describe('quantityDoubt (the records grid asks before saving a quantity far from the farm’s history per hectare)', () => {
  const wheat = { id: 1, name: 'Wheat', unit: 't' };
  // Invented history: 150 ha and 1,125 / 1,200 / 1,275 t of wheat, i.e. 7.5, 8 and 8.5 t/ha (median 8).
  const rows: SeasonRow[] = [
    { seasonId: 1, season: '2022/23', startYear: 2022, landHa: 150, i1: 1125 },
    { seasonId: 2, season: '2023/24', startYear: 2023, landHa: 150, i1: 1200 },
    { seasonId: 3, season: '2024/25', startYear: 2024, landHa: 150, i1: 1275 },
    { seasonId: 4, season: '2025/26', startYear: 2025, landHa: 150, i1: null },
  ];
  it('asks about 12,000 t (80 t/ha, a slipped decimal mark) and 120 t, not about 1,250 t', () => {
    expect(quantityDoubt(rows, rows[3], wheat, 'F01', 12000)).toBe(
      "12,000 t of wheat on 150 ha is 80 t/ha, about 10 times F01's usual 8 t/ha (median of 3 seasons); is the decimal mark in the right place?",
    );
    expect(quantityDoubt(rows, rows[3], wheat, 'F01', 120)).toMatch(/^120 t of wheat on 150 ha is 0\.8 t\/ha, about 1\/10 of F01's usual 8 t\/ha/);
    expect(quantityDoubt(rows, rows[3], wheat, 'F01', 1250)).toBeNull();
  });
  it('does not judge without land for the season, with fewer than three seasons of history, or a quantity of 0', () => {
    expect(quantityDoubt(rows, { ...rows[3], landHa: null }, wheat, 'F01', 12000)).toBeNull();
    expect(quantityDoubt(rows.slice(1), rows[3], wheat, 'F01', 12000)).toBeNull();
    expect(quantityDoubt(rows, rows[3], wheat, 'F01', 0)).toBeNull();
  });
});
