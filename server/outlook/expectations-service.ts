import type { Db } from '../db/client.js';
import type { ItemExpectation } from '../../shared/outlook-types.js';
import { AppError } from '../core/app-error.js';
import { priceSeries } from '../prices/prices-repository.js';
import { getSettings } from '../settings/settings-service.js';
import {
  computeExpectation,
  ERROR_WINDOW,
  errorHistory,
  ExpectationError,
  expectationAt,
  methodLabel,
  type ComputedExpectation,
  type ExpectationData,
  type ExpectationMethod,
  type ExpectationSetting,
  type FuturesBySeason,
  type PricePoint,
} from './expectations.js';
import { quotesOfItems } from './futures-repository.js';
import { itemsWithCodes, seasonsInOrder, type ItemRow } from './projection-repository.js';

export type { ItemExpectation } from '../../shared/outlook-types.js';

/** The data every method of one item draws on: the co-op's mean price per season before the target, and futures quotes. */
export async function expectationData(db: Db, itemRows: ItemRow[], target: { label: string; startYear: number }): Promise<Map<number, ExpectationData>> {
  const { currency } = await getSettings(db);
  const seasonRows = await seasonsInOrder(db);
  const yearOf = new Map(seasonRows.map((s) => [s.label, s.startYear]));
  const series = itemRows.length ? await priceSeries(db, itemRows.map((i) => i.id)) : { seasons: [], series: [] };
  const quotes = await quotesOfItems(
    db,
    itemRows.map((i) => i.id),
  );
  const seasonById = new Map(seasonRows.map((s) => [s.id, s]));
  const out = new Map<number, ExpectationData>();
  for (const it of itemRows) {
    const s = series.series.find((x) => x.itemCode === it.code);
    const history: PricePoint[] = [];
    s?.values.forEach((v, k) => {
      const label = series.seasons[k]!;
      const year = yearOf.get(label)!;
      if (v !== null && year < target.startYear) history.push({ season: label, year, price: v });
    });
    const futures: FuturesBySeason = new Map();
    for (const q of quotes.filter((x) => x.itemId === it.id)) {
      const season = seasonById.get(q.seasonId)!;
      const entry = futures.get(season.startYear) ?? { season: season.label, quotes: [] };
      entry.quotes.push({ contract: q.contract, quote: q.quote, quotedOn: q.quotedOn });
      futures.set(season.startYear, entry);
    }
    out.set(it.id, { history, target: { season: target.label, year: target.startYear }, futures, priceUnit: `${currency}/${it.unit}` });
  }
  return out;
}

/**
 * Computes every setting; problems are collected per item and reported together as a 422 whose
 * details name `body.items.<n>.method` (or `.band`), so nothing half-computed is stored.
 */
export async function computeExpectations(db: Db, settings: ExpectationSetting[], target: { label: string; startYear: number }): Promise<ItemExpectation[]> {
  const { currency } = await getSettings(db);
  const rows = await itemsWithCodes(db, settings.map((s) => s.item));
  const unknown = settings.map((s, i) => ({ s, i })).filter(({ s }) => !rows.some((r) => r.code === s.item));
  if (unknown.length)
    throw AppError.invalid(
      `Unknown item: ${unknown.map((u) => u.s.item).join(', ')}`,
      unknown.map((u) => ({ path: `body.items.${u.i}.item`, message: `No item has the code "${u.s.item}"` })),
    );
  const data = await expectationData(db, rows, target);
  const details: { path: string; message: string }[] = [];
  const out: ItemExpectation[] = [];
  settings.forEach((s, i) => {
    const row = rows.find((r) => r.code === s.item)!;
    try {
      const c = computeExpectation(s, data.get(row.id)!);
      out.push({ ...c, name: row.name, role: row.role, unit: row.unit, currency });
    } catch (err) {
      if (!(err instanceof ExpectationError)) throw err;
      details.push({ path: `body.items.${i}.${err.field}`, message: `${row.name}: ${err.message}` });
    }
  });
  if (details.length) throw AppError.unprocessable(`Some expected prices cannot be computed: ${details.map((d) => d.message).join('; ')}`, details);
  return out;
}

/** The candidate methods side by side for one item: value and past errors of each, to choose from. */
export async function compareMethods(db: Db, itemCode: string, target: { label: string; startYear: number }) {
  const [row] = await itemsWithCodes(db, [itemCode]);
  if (!row) throw AppError.notFound(`The item "${itemCode}"`);
  const data = (await expectationData(db, [row], target)).get(row.id)!;
  const candidates: ExpectationMethod[] = [
    { kind: 'last' },
    { kind: 'moving-average', k: 3 },
    { kind: 'moving-average', k: 5 },
    { kind: 'moving-average', k: 5, olympic: true },
    { kind: 'trend', seasons: 10 },
    { kind: 'adaptive', lambda: 0.3 },
    { kind: 'adaptive', lambda: 0.5 },
    { kind: 'adaptive', lambda: 0.7 },
    { kind: 'futures-basis', contract: null, basisSeasons: 5 },
  ];
  return {
    item: row.code,
    name: row.name,
    unit: row.unit,
    priceUnit: data.priceUnit,
    season: target.label,
    errorWindow: ERROR_WINDOW,
    history: data.history,
    methods: candidates.map((method) => {
      try {
        const at = expectationAt(method, data.history, data.target, data.futures, data.priceUnit);
        const errors = errorHistory(method, data.history, data.futures, data.priceUnit);
        return { method, label: methodLabel(method), value: at.value, explanation: at.explanation, errors, problem: null };
      } catch (err) {
        if (!(err instanceof ExpectationError)) throw err;
        return { method, label: methodLabel(method), value: null, explanation: null, errors: null, problem: err.message };
      }
    }),
  };
}
