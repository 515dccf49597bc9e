import type { FarmRecordRow } from '../../../shared/api-types';
import { TEST_ITEMS, TEST_SEASONS } from '../data-desk/test-lookups';
import { pivotRecords, recordCellProblem } from './records-pivot';

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
