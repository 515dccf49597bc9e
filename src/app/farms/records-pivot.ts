import type { FarmRecordRow, Item, Season } from '../../../shared/api-types';
import type { FactorRow, LandRow } from '../data-desk/data-desk-api';
import { implausibleQuantity, quantityHistory } from '../../../shared/plausibility';
import { numberInMessage, VALUE_MAX } from '../../../shared/field-limits';

/**
 * One season of a farm: land, a quantity per item (`i<itemId>`) and the level of each other fixed
 * factor (`fx_<name>`), null where nothing is recorded.
 */
export interface SeasonRow {
  seasonId: number;
  season: string;
  startYear: number;
  landHa: number | null;
  [itemKey: `i${number}`]: number | null;
  [factorKey: `fx_${string}`]: number | null;
}

export const itemKey = (itemId: number): `i${number}` => `i${itemId}`;
export const factorKey = (factor: string): `fx_${string}` => `fx_${factor}`;

/** Records and land of one farm as a table of seasons (newest first) by items; every season is a row, so gaps show. */
export function pivotRecords(
  seasons: readonly Season[],
  items: readonly Item[],
  records: readonly FarmRecordRow[],
  land: readonly LandRow[],
  factors: readonly FactorRow[] = [],
  factorNames: readonly string[] = [],
): SeasonRow[] {
  const landOf = new Map(land.map((l) => [l.seasonId, l.landHa]));
  const level = new Map(factors.map((f) => [`${f.seasonId}|${f.factor}`, f.value]));
  const qty = new Map(records.map((r) => [`${r.seasonId}|${r.itemId}`, r.quantity]));
  return [...seasons]
    .sort((a, b) => b.startYear - a.startYear)
    .map((s) => {
      const row: SeasonRow = { seasonId: s.id, season: s.label, startYear: s.startYear, landHa: landOf.get(s.id) ?? null };
      for (const it of items) row[itemKey(it.id)] = qty.get(`${s.id}|${it.id}`) ?? null;
      for (const name of factorNames) row[factorKey(name)] = level.get(`${s.id}|${name}`) ?? null;
      return row;
    });
}

/** What is wrong with a quantity, land or other fixed-factor cell, in the shared schema's words and limits (shared/field-limits.ts), or null. */
export function recordCellProblem(kind: 'quantity' | 'land' | 'factor', value: unknown): string | null {
  if (value === null || value === undefined || value === '') {
    return kind === 'land' ? 'Land cannot be left empty: enter the hectares farmed that season' : null;
  }
  const n = typeof value === 'number' ? value : Number(String(value).trim());
  if (!Number.isFinite(n)) return `${JSON.stringify(String(value))} is not a number: write it with a point for decimals`;
  if (kind === 'land') {
    if (!(n > 0)) return 'Land must be more than 0 ha';
    if (n > VALUE_MAX.landHa) return `Land must be at most ${numberInMessage(VALUE_MAX.landHa)} ha`;
    return null;
  }
  if (kind === 'factor') {
    if (n < 0) return 'A fixed factor cannot be negative';
    if (n > VALUE_MAX.factor) return `The value is larger than the largest kept (${numberInMessage(VALUE_MAX.factor)})`;
    return null;
  }
  if (n < 0) return 'A quantity cannot be negative (inputs are recorded as positive amounts used)';
  if (n > VALUE_MAX.quantity) return `The quantity is larger than the largest kept (${numberInMessage(VALUE_MAX.quantity)})`;
  return null;
}

/**
 * Why a new quantity of an item looks like a slip against the farm's own history per hectare (its
 * other seasons in the grid), or null (shared/plausibility.ts: beyond 3× or ⅓ of the median over at
 * least three seasons with land). The grid asks before saving such a value.
 */
export function quantityDoubt(rows: readonly SeasonRow[], row: SeasonRow, item: { id: number; name: string; unit: string }, farmCode: string, quantity: number): string | null {
  const key = itemKey(item.id);
  const others = rows.filter((r) => r.seasonId !== row.seasonId && typeof r[key] === 'number').map((r) => ({ quantity: r[key] as number, landHa: r.landHa }));
  return implausibleQuantity(quantity, row.landHa, item, farmCode, quantityHistory(others));
}
