import { ApiRequestError } from '../core/api-error';
import { detailsForItem } from './expectation-dialog';
import { describeFixed, describeFixedSource, formatPrice, formatPriceIn, formatQuantity, landSentence, nextSeasonLabel, suggestedOutlookSeason } from './outlook-format';
import { finishedRuns, type ItemProjection } from './outlook-api-types';
import { numberWidth, projectionRows } from './projection-grid';

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

  it('should carry every scenario at the estimates, the figure the member portal shows for low and high', () => {
    const [row] = projectionRows([nitrogen], false);

    expect([row!['low_point'], row!.point, row!['high_point']]).toEqual([58_005, 61_005, 64_005]);
  });

  it('should size a column to show its widest number whole', () => {
    // "1,423,000": 7 digits of about 8 px, 2 separators of about 4 px, 44 px of padding and sort arrow.
    expect(numberWidth('1,423,000')).toBe(Math.ceil(7 * 8.2 + 2 * 4.2 + 44));
    expect(numberWidth('1,423,000')).toBeGreaterThan(numberWidth('36,050'));
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
  it('should show quantities at four significant figures from 10,000, whole units from 100, one decimal below', () => {
    expect([formatQuantity(1_423_282), formatQuantity(1_393_108), formatQuantity(46_306), formatQuantity(9_999.4)]).toEqual(['1,423,000', '1,393,000', '46,310', '9,999']);
    expect([formatQuantity(31_400.4), formatQuantity(444.4), formatQuantity(12.34), formatQuantity(-3.21)]).toEqual(['31,400', '444', '12.3', '−3.2']);
  });

  it('should write prices with 2 or 3 decimals, rounding a last 5 up as the server explanations do', () => {
    expect([formatPrice(212.125), formatPrice(1.2), formatPrice(null)]).toEqual(['212.13', '1.200', '—']);
    // 1.3215 and 0.6685 lie just below in binary; server/outlook/expectations.test.ts checks the server's text of the same cases.
    expect([formatPrice(1.3215), formatPrice(0.6685)]).toEqual(['1.322', '0.669']);
    expect([formatPriceIn(178.92, 'EUR/t'), formatPriceIn(1.74, 'EUR/kg N'), formatPriceIn(null, 'EUR/t')]).toEqual(['178.92 EUR/t', '1.740 EUR/kg N', '—']);
  });

  it('should suggest a season opened ahead without an outlook, else the one after the latest', () => {
    const now = new Date('2026-12-03T12:00:00Z');
    const seasons = [{ label: '2025/26', startYear: 2025 }, { label: '2026/27', startYear: 2026 }];
    expect(suggestedOutlookSeason(seasons, [], now)).toBe('2026/27');
    expect(suggestedOutlookSeason(seasons, ['2026/27'], now)).toBe('2027/28');
    expect(suggestedOutlookSeason(seasons.slice(0, 1), [], now)).toBe('2026/27');
  });

  it('should suggest the season after the latest one', () => {
    expect(nextSeasonLabel(2025)).toBe('2026/27');
    expect(nextSeasonLabel(2098)).toBe('2099/00');
  });

  it('should name the fixed factors a farm was projected at, land first', () => {
    expect(describeFixed({ trend: 21, land_ha: 262.4 })).toBe('262 ha of land, trend index 21');
    expect(describeFixed({ land_ha: 262, stock_lu: 40 })).toBe('262 ha of land, stock lu 40.0');
  });

  it('should say where the land came from in plain words, also for versions published with the stored names', () => {
    expect(describeFixedSource('land recorded for 2025/26')).toBe('land recorded for 2025/26');
    expect(describeFixedSource('land_ha of 2025/26')).toBe('land recorded for 2025/26');
    expect(describeFixedSource('land_ha from the farm register')).toBe('land on the farm register');
  });

  it('should explain in one sentence which land figure the projection used', () => {
    expect(landSentence({ fixed: { land_ha: 262, trend: 21 }, fixedSource: 'land recorded for 2025/26' })).toContain('uses the 262 ha of land recorded for 2025/26, the latest season with records');
    expect(landSentence({ fixed: { land_ha: 262 }, fixedSource: 'land_ha of 2025/26' })).toContain('the land on the farm register can differ');
    expect(landSentence({ fixed: { land_ha: 271 }, fixedSource: 'land on the farm register' }, true)).toBe('No land is recorded for any season of your farm, so the projection uses the 271 ha on the farm register.');
    expect(landSentence({ fixed: { trend: 21 }, fixedSource: '' })).toBe('');
  });
});
