import { createHash } from 'node:crypto';
import type { ModelDefinition } from '../../shared/model-schemas.js';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import type { NetputDataset } from '../estimation/index.js';
import { farmRecordsOf, farmSeasonFactorsOf, farmsByCode, itemsByCode, pricesWithRegion, seasonsOldestFirst } from './models-repository.js';

export interface ExcludedObservation {
  farm: string;
  season: string;
  reason: string;
}

/**
 * Builds the estimation sample from the data desk: one observation per farm and season that has a
 * record of every chosen item and of every fixed factor. The price a farm faced is the season's
 * mean at the delivery points of its region, or the co-op mean where its region has none.
 */
export async function buildDataset(db: Db, def: ModelDefinition): Promise<{ dataset: NetputDataset; excluded: ExcludedObservation[] }> {
  const itemRows = await itemsByCode(db, def.items);
  const missing = def.items.filter((c) => !itemRows.some((r) => r.code === c));
  if (missing.length) throw AppError.invalid(`Unknown item: ${missing.join(', ')}`, [{ path: 'definition.items', message: `Unknown: ${missing.join(', ')}` }]);
  // Outputs first, then inputs, in the order chosen.
  const ordered = def.items.map((c) => itemRows.find((r) => r.code === c)!).sort((a, b) => (a.role === b.role ? 0 : a.role === 'output' ? -1 : 1));
  const allSeasons = await seasonsOldestFirst(db);
  const fromYear = def.fromSeason ? allSeasons.find((s) => s.label === def.fromSeason)?.startYear : -Infinity;
  const toYear = def.toSeason ? allSeasons.find((s) => s.label === def.toSeason)?.startYear : Infinity;
  if (fromYear === undefined) throw AppError.invalid(`Unknown season ${def.fromSeason}`, [{ path: 'definition.fromSeason', message: 'No such season' }]);
  if (toYear === undefined) throw AppError.invalid(`Unknown season ${def.toSeason}`, [{ path: 'definition.toSeason', message: 'No such season' }]);
  const sample = allSeasons.filter((s) => s.startYear >= fromYear && s.startYear <= toYear);
  const farmRows = (await farmsByCode(db)).filter((f) => !def.farms || def.farms.includes(f.code));
  if (def.farms) {
    const unknown = def.farms.filter((c) => !farmRows.some((f) => f.code === c));
    if (unknown.length) throw AppError.invalid(`Unknown farm: ${unknown.join(', ')}`, [{ path: 'definition.farms', message: `Unknown: ${unknown.join(', ')}` }]);
  }
  const itemIds = ordered.map((i) => i.id);
  const seasonIds = sample.map((s) => s.id);
  const farmIds = farmRows.map((f) => f.id);
  const priceRows = seasonIds.length
    ? await pricesWithRegion(db, itemIds, seasonIds)
    : [];
  const recordRows =
    seasonIds.length && farmIds.length
      ? await farmRecordsOf(db, itemIds, seasonIds, farmIds)
      : [];
  const factorRows =
    seasonIds.length && farmIds.length && def.fixedFactors.length
      ? await farmSeasonFactorsOf(db, def.fixedFactors, seasonIds, farmIds)
      : [];
  const unrecorded = def.fixedFactors.filter((f) => !factorRows.some((r) => r.factor === f));
  if (unrecorded.length) {
    throw AppError.invalid(`No farm in the sample has a recorded value of ${unrecorded.join(', ')}`, [
      { path: 'definition.fixedFactors', message: `Not recorded: ${unrecorded.join(', ')}` },
    ]);
  }

  const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : undefined);
  const priceFaced = (itemId: number, seasonId: number, region: string) => {
    const all = priceRows.filter((p) => p.itemId === itemId && p.seasonId === seasonId);
    return mean(all.filter((p) => p.region === region).map((p) => p.price)) ?? mean(all.map((p) => p.price));
  };
  const qty = new Map(recordRows.map((r) => [`${r.farmId}/${r.seasonId}/${r.itemId}`, r.quantity]));
  const factorValue = new Map(factorRows.map((r) => [`${r.farmId}/${r.seasonId}/${r.factor}`, r.value]));

  const ds: NetputDataset = {
    items: ordered.map((i) => ({ name: i.code, role: i.role })),
    fixedFactors: [...def.fixedFactors],
    seasons: [],
    seasonYears: [],
    farms: [],
    prices: ordered.map(() => []),
    quantities: ordered.map(() => []),
    fixed: def.fixedFactors.map(() => []),
    rows: [],
  };
  const excluded: ExcludedObservation[] = [];
  let row = 1;
  for (const s of sample) {
    for (const f of farmRows) {
      row++;
      const prices = ordered.map((i) => priceFaced(i.id, s.id, f.region));
      const quantities = ordered.map((i) => qty.get(`${f.id}/${s.id}/${i.id}`));
      const levels = def.fixedFactors.map((factor) => factorValue.get(`${f.id}/${s.id}/${factor}`));
      const noFactor = def.fixedFactors.filter((_, k) => levels[k] === undefined);
      const noPrice = ordered.filter((_, k) => prices[k] === undefined).map((i) => i.code);
      const noRecord = ordered.filter((_, k) => quantities[k] === undefined).map((i) => i.code);
      if (quantities.every((q) => q === undefined)) continue; // the farm has no records that season
      if (noPrice.length) excluded.push({ farm: f.code, season: s.label, reason: `no price for ${noPrice.join(', ')}` });
      else if (noRecord.length) excluded.push({ farm: f.code, season: s.label, reason: `no record of ${noRecord.join(', ')}` });
      else if (noFactor.length) excluded.push({ farm: f.code, season: s.label, reason: noFactor.map((n) => (n === 'land_ha' ? 'no land recorded' : `no ${n} recorded`)).join(', ') });
      else {
        ds.seasons.push(s.label);
        ds.seasonYears.push(s.startYear);
        ds.farms!.push(f.code);
        prices.forEach((p, k) => ds.prices[k].push(p!));
        quantities.forEach((q, k) => ds.quantities[k].push(q!));
        levels.forEach((v, k) => ds.fixed[k].push(v!));
        ds.rows.push(row);
      }
    }
  }
  if (ds.seasons.length === 0) throw AppError.unprocessable('No farm and season in the sample has complete records and prices for the chosen items');
  return { dataset: ds, excluded };
}

/** JSON with object keys sorted at every level, so a value read back from jsonb hashes the same. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
  }
  return JSON.stringify(value) ?? 'null';
}

/** SHA-256 of a value's canonical JSON: the data snapshot and the options each get one. */
export function hashOf(value: unknown): string {
  return createHash('sha256').update(canonicalJson(value)).digest('hex');
}
