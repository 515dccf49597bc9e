import type { DeliveryPoint, Item, Season } from '../../../shared/api-types';
import { makeLookups } from './reference-store';

// A small catalogue for the specs, shaped like the demo co-op's (invented data).
export const TEST_ITEMS: Item[] = [
  { id: 1, code: 'wheat', name: 'Wheat', role: 'output', category: 'grain', unit: 't', nPct: null, p2o5Pct: null, k2oPct: null },
  { id: 3, code: 'nitrogen', name: 'Nitrogen (N)', role: 'input', category: 'fertiliser', unit: 'kg N', nPct: 100, p2o5Pct: null, k2oPct: null },
  { id: 6, code: 'diesel', name: 'Diesel', role: 'input', category: 'fuel', unit: 'L', nPct: null, p2o5Pct: null, k2oPct: null },
];
export const TEST_SEASONS: Season[] = [
  { id: 18, label: '2023/24', startYear: 2023, startMonth: 7, startsOn: '2023-07-01' },
  { id: 19, label: '2024/25', startYear: 2024, startMonth: 7, startsOn: '2024-07-01' },
];
export const TEST_POINTS: DeliveryPoint[] = [
  { id: 1, name: 'Larkfield terminal', kind: 'delivery point', region: 'Riverlands' },
  { id: 4, name: 'Co-op input depot', kind: 'delivery point', region: 'Riverlands' },
];
export const testLookups = () => makeLookups(TEST_ITEMS, TEST_SEASONS, TEST_POINTS);
