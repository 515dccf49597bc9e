import type { FarmRecordRow, Item, Season } from '../../../shared/api-types';
import type { LandRow } from '../data-desk/data-desk-api';

/** One season of a farm: land and a quantity per item (`i<itemId>`), null where nothing is recorded. */
export interface SeasonRow {
  seasonId: number;
  season: string;
  startYear: number;
  landHa: number | null;
  [itemKey: `i${number}`]: number | null;
}

export const itemKey = (itemId: number): `i${number}` => `i${itemId}`;

/** Records and land of one farm as a table of seasons (newest first) by items; every season is a row, so gaps show. */
export function pivotRecords(seasons: readonly Season[], items: readonly Item[], records: readonly FarmRecordRow[], land: readonly LandRow[]): SeasonRow[] {
  const landOf = new Map(land.map((l) => [l.seasonId, l.landHa]));
  const qty = new Map(records.map((r) => [`${r.seasonId}|${r.itemId}`, r.quantity]));
  return [...seasons]
    .sort((a, b) => b.startYear - a.startYear)
    .map((s) => {
      const row: SeasonRow = { seasonId: s.id, season: s.label, startYear: s.startYear, landHa: landOf.get(s.id) ?? null };
      for (const it of items) row[itemKey(it.id)] = qty.get(`${s.id}|${it.id}`) ?? null;
      return row;
    });
}

/** What is wrong with a quantity or land cell, in the shared schema's words, or null. */
export function recordCellProblem(kind: 'quantity' | 'land', value: unknown): string | null {
  if (value === null || value === undefined || value === '') {
    return kind === 'land' ? 'Land cannot be left empty: enter the hectares farmed that season' : null;
  }
  const n = typeof value === 'number' ? value : Number(String(value).trim());
  if (!Number.isFinite(n)) return `${JSON.stringify(String(value))} is not a number: write it with a point for decimals`;
  if (kind === 'land') {
    if (!(n > 0)) return 'Land must be more than 0 ha';
    if (n > 1e6) return 'Land must be at most 1,000,000 ha';
    return null;
  }
  if (n < 0) return 'A quantity cannot be negative (inputs are recorded as positive amounts used)';
  if (n > 1e12) return 'The quantity is larger than the largest kept (1,000,000,000,000)';
  return null;
}
