import { ApiRequestError } from '../core/api-error';
import { detailsForItem } from './expectation-dialog';
import { describeFixed, formatPrice, formatQuantity, nextSeasonLabel } from './outlook-format';
import { finishedRuns, type ItemProjection } from './outlook-types';
import { projectionRows } from './projection-grid';

// Invented figures: the shaping of API answers for the screens is under test.
const q = (median: number) => ({ point: median + 5, mean: median, sd: 10, median, p5: median - 100, p95: median + 100 });

describe('projectionRows', () => {
  const nitrogen: ItemProjection = {
    item: 'nitrogen',
    name: 'Nitrogen (N)',
    role: 'input',
    unit: 'kg N',
    scenarios: { low: q(58_000), base: q(61_000), high: q(64_000) },
    tonnes: { unit: 't N', scenarios: { low: q(58), base: q(61), high: q(64) } },
  };
  const diesel: ItemProjection = { item: 'diesel', name: 'Diesel', role: 'input', unit: 'L', scenarios: { low: q(690), base: q(700), high: q(710) }, tonnes: null };

  it('should lay each scenario out as 5 %, median and 95 % columns with the base point at the estimates', () => {
    const [row] = projectionRows([nitrogen], false);

    expect(row).toMatchObject({ name: 'Nitrogen (N)', unit: 'kg N', point: 61_005, low_p5: 57_900, low_median: 58_000, base_median: 61_000, base_p95: 61_100, high_median: 64_000 });
  });

  it('should switch items counted by mass to tonnes and leave litres as they are', () => {
    const rows = projectionRows([nitrogen, diesel], true);

    expect(rows.map((r) => [r.unit, r['base_median']])).toEqual([
      ['t N', 61],
      ['L', 700],
    ]);
  });
});

describe('detailsForItem', () => {
  const error = new ApiRequestError(422, {
    code: 'unprocessable',
    message: 'Some expected prices cannot be computed',
    details: [
      { path: 'body.items.1.band', message: 'Diesel: A manual figure has no history of errors' },
      { path: 'body.items.0.method', message: 'Wheat: No futures quote is recorded for 2026/27' },
    ],
  });

  it("should pick this item's messages by its index in the list and tell method from band", () => {
    expect(detailsForItem(error, 0)).toEqual({ method: 'Wheat: No futures quote is recorded for 2026/27' });
    expect(detailsForItem(error, 1)).toEqual({ band: 'Diesel: A manual figure has no history of errors' });
  });

  it("should fall back to the server's message when no detail names the item", () => {
    expect(detailsForItem(error, 4)).toEqual({ other: 'Some expected prices cannot be computed' });
  });
});

describe('finishedRuns', () => {
  it('should offer only finished runs, newest first, named by model and run', () => {
    const runs = finishedRuns([
      { id: 1, name: 'A', definition: { items: ['wheat'] }, runs: [{ id: 3, modelId: 1, status: 'failed', finishedAt: null, dataHash: 'x' }, { id: 2, modelId: 1, status: 'succeeded', finishedAt: '2026-11-20T10:00:00Z', dataHash: 'y' }] },
      { id: 2, name: 'B', definition: { items: ['canola'] }, runs: [{ id: 5, modelId: 2, status: 'succeeded', finishedAt: null, dataHash: 'z' }] },
    ]);

    expect(runs.map((r) => [r.id, r.label])).toEqual([
      [5, 'B · run #5'],
      [2, 'A · run #2, 20 Nov 2026'],
    ]);
  });
});

describe('outlook formats', () => {
  it('should follow the e-mail precision: whole units from 100, prices with 2 or 3 decimals', () => {
    expect([formatQuantity(31_400.4), formatQuantity(12.34), formatQuantity(-3.21)]).toEqual(['31,400', '12.3', '−3.2']);
    expect([formatPrice(212.125), formatPrice(1.2), formatPrice(null)]).toEqual(['212.13', '1.200', '—']);
  });

  it('should suggest the season after the latest one', () => {
    expect(nextSeasonLabel(2025)).toBe('2026/27');
    expect(nextSeasonLabel(2098)).toBe('2099/00');
  });

  it('should name the fixed factors a farm was projected at, land first', () => {
    expect(describeFixed({ trend: 21, land_ha: 262.4 })).toBe('262 ha of land, trend index 21');
  });
});
