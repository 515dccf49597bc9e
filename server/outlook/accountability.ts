/**
 * Forecast against outcome: after a season, the farm records of that season (deliveries and
 * purchases, when entered) and its mean prices are set against the published outlook, per item and
 * per farm, season after season. Errors follow the back-test's sign: (projected − actual) / actual,
 * positive when the outlook projected too much (server/jobs/fit-task.ts `backtest`).
 */
import type { Db } from '../db/client.js';
import { priceSeries } from '../prices/prices-repository.js';
import type { Comparison, FarmOutlook, FertiliserComparison, OutlookSnapshot } from '../../shared/outlook-types.js';
import { itemNutrients, NUTRIENT_LABEL, NUTRIENTS, zeroAmounts, type Nutrient, type NutrientAmounts } from '../budget/nutrients.js';
import { seasonBookedLines, seasonHasRound } from '../bookings/bookings-repository.js';
import type { BookingLine } from '../../shared/booking-types.js';
import { allFarmParts } from './outlook-repository.js';
import { allItems, recordedQuantities, seasonRecordsWithFarms, versionsWithSeasons, type ItemRow, type PublishedVersionRow } from './accountability-repository.js';

export type { Comparison } from '../../shared/outlook-types.js';

const pct = (projected: number, actual: number | null) => (actual !== null && actual !== 0 ? (100 * (projected - actual)) / actual : null);

function compare(base: Omit<Comparison, 'actual' | 'error' | 'errorPct' | 'withinBand'>, actual: number | null): Comparison {
  return {
    ...base,
    actual,
    error: actual === null ? null : base.projected - actual,
    errorPct: pct(base.projected, actual),
    withinBand: actual === null || base.p5 === null || base.p95 === null ? null : actual >= base.p5 && actual <= base.p95,
  };
}

const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null);

async function seasonReport(db: Db, v: PublishedVersionRow, itemRows: ItemRow[]) {
  const snap = v.snapshot as OutlookSnapshot;
  const parts = await allFarmParts(db, v.id);
  const codes = snap.projection.coop.items.map((i) => i.item);
  const ids = itemRows.filter((i) => codes.includes(i.code));
  const recs = await recordedQuantities(
    db,
    v.seasonId,
    parts.map((p) => p.farmId),
    ids.map((i) => i.id),
  );
  const codeOf = new Map(ids.map((i) => [i.id, i.code]));
  const actual = new Map(recs.map((r) => [`${r.farmId}/${codeOf.get(r.itemId)}`, r.quantity]));
  const farmsOut = parts
    .sort((a, b) => a.code.localeCompare(b.code))
    .map((f) => ({
      farmId: f.farmId,
      code: f.code,
      name: f.name,
      items: f.items.map((it) => {
        const q = it.scenarios.base!;
        return compare({ item: it.item, name: it.name, unit: it.unit, role: it.role, projected: q.point, p5: q.p5, p95: q.p95 }, actual.get(`${f.farmId}/${it.item}`) ?? null);
      }),
    }));
  const coopItems = snap.projection.coop.items.map((it) => {
    const reported = parts.filter((f) => actual.has(`${f.farmId}/${it.item}`));
    const complete = reported.length === parts.length;
    const q = it.scenarios.base!;
    // With every farm reported the co-op projection and band apply as published; otherwise the
    // comparison is over the farms that reported, at their own point projections.
    const projected = complete ? q.point : reported.reduce((a, f) => a + f.items.find((x) => x.item === it.item)!.scenarios.base!.point, 0);
    const act = reported.length ? reported.reduce((a, f) => a + actual.get(`${f.farmId}/${it.item}`)!, 0) : null;
    return {
      ...compare({ item: it.item, name: it.name, unit: it.unit, role: it.role, projected, p5: complete ? q.p5 : null, p95: complete ? q.p95 : null }, act),
      farmsReported: reported.length,
      farmsProjected: parts.length,
    };
  });
  const series = await priceSeries(db, ids.map((i) => i.id));
  const k = series.seasons.indexOf(v.season);
  const prices = snap.expectations.map((e) => {
    const s = series.series.find((x) => x.itemCode === e.item);
    const act = k >= 0 ? (s?.values[k] ?? null) : null;
    return {
      item: e.item,
      name: e.name,
      priceUnit: e.priceUnit,
      method: e.methodLabel,
      expected: { low: e.low, base: e.base, high: e.high },
      actual: act,
      errorPct: pct(e.base, act),
      withinRange: act === null ? null : act >= Math.min(e.low, e.high) && act <= Math.max(e.low, e.high),
    };
  });
  return {
    season: v.season,
    startYear: v.startYear,
    outlookId: v.outlookId,
    versionId: v.id,
    version: v.version,
    publishedAt: v.publishedAt,
    modelRunId: snap.model.runId,
    status: recs.length ? (coopItems.every((c) => c.farmsReported === c.farmsProjected) ? 'complete' : 'partial') : 'awaiting records',
    items: coopItems,
    prices,
    farms: farmsOut,
    fertiliser: await fertiliserReport(db, v, parts, itemRows),
  };
}

// ---- fertiliser: projected, booked and used ---------------------------------------------------

const NUTRIENT_NAME: Record<Nutrient, string> = { nitrogen: 'Nitrogen', phosphate: 'Phosphate', potash: 'Potash' };
const kgWords = (v: number, n: Nutrient) => `${Math.round(v).toLocaleString('en-GB')} kg ${NUTRIENT_LABEL[n]}`;
const share = (a: number, b: number) => `${Math.round((100 * a) / b)} %`;

function fertiliserRow(n: Nutrient, projected: number | null, booked: number | null, actual: number | null): FertiliserComparison {
  const parts: string[] = [];
  parts.push(projected === null ? 'there was no projection' : `the outlook projected ${kgWords(projected, n)}`);
  if (booked === null) parts.push('the co-op took no bookings for the season');
  else parts.push(booked > 0 ? `members booked ${kgWords(booked, n)} through the co-op${projected ? ` (${share(booked, projected)} of the projection)` : ''}` : 'nothing was booked through the co-op');
  if (actual === null) parts.push('no use is recorded yet');
  else {
    let used = `the records show ${kgWords(actual, n)} used`;
    if (actual > 0 && booked !== null) used += `, so the bookings covered ${share(booked, actual)} of use`;
    if (actual > 0 && projected !== null) {
      const e = (100 * (projected - actual)) / actual;
      used += Math.abs(e) < 0.5 ? ' and the projection matched use' : `, and the projection was ${Math.abs(Math.round(e))} % ${e > 0 ? 'above' : 'below'} use`;
    }
    parts.push(used);
  }
  const words = `${NUTRIENT_NAME[n]} (${NUTRIENT_LABEL[n]}): ${parts.slice(0, -1).join(', ')} and ${parts.at(-1)}.`;
  return {
    nutrient: n,
    name: `${NUTRIENT_NAME[n]} (${NUTRIENT_LABEL[n]})`,
    unit: `kg ${NUTRIENT_LABEL[n]}`,
    projected,
    booked,
    actual,
    bookedShareOfUse: booked !== null && actual !== null && actual > 0 ? booked / actual : null,
    errorPct: projected !== null ? pct(projected, actual) : null,
    words,
  };
}

/**
 * Per nutrient and per farm with records in the season: the projection of the published outlook
 * (fertiliser items by their grade), what the members booked for that season (each line's nutrients
 * by the product's analysis, as booked), and what the farm records show was used. The co-op rows add
 * up the farms with records only, so the three figures cover the same farms.
 */
async function fertiliserReport(db: Db, v: PublishedVersionRow, parts: FarmOutlook[], itemRows: ItemRow[]) {
  const graded = itemRows.filter((i) => i.category === 'fertiliser' && itemNutrients(i, 1) !== null);
  const gradedById = new Map(graded.map((i) => [i.id, i]));
  const gradedByCode = new Map(graded.map((i) => [i.code, i]));
  const recs = await seasonRecordsWithFarms(db, v.seasonId);
  const hasRound = await seasonHasRound(db, v.seasonId);
  const booked = await seasonBookedLines(db, v.seasonId);
  const add = (into: NutrientAmounts, a: NutrientAmounts | null) => {
    if (a) for (const n of NUTRIENTS) into[n] += a[n];
  };
  const farmIds = [...new Map(recs.map((r) => [r.farmId, { code: r.code, name: r.name }])).entries()].sort((a, b) => a[1].code.localeCompare(b[1].code));
  const totals = { projected: zeroAmounts(), booked: zeroAmounts(), actual: zeroAmounts(), projectedFarms: 0, usedFarms: 0 };
  const farmsOut = farmIds.map(([farmId, f]) => {
    const part = parts.find((p) => p.farmId === farmId);
    let projected: NutrientAmounts | null = null;
    if (part) {
      projected = zeroAmounts();
      for (const it of part.items) {
        const row = gradedByCode.get(it.item);
        if (row) add(projected, itemNutrients(row, it.scenarios.base!.point));
      }
    }
    const mine = recs.filter((r) => r.farmId === farmId && gradedById.has(r.itemId));
    let actual: NutrientAmounts | null = null;
    if (mine.length) {
      actual = zeroAmounts();
      for (const r of mine) add(actual, itemNutrients(gradedById.get(r.itemId)!, r.quantity));
    }
    let bookedKg: NutrientAmounts | null = null;
    if (hasRound) {
      bookedKg = zeroAmounts();
      for (const b of booked.filter((x) => x.farmId === farmId)) for (const l of b.lines as BookingLine[]) add(bookedKg, l.nutrients);
    }
    add(totals.projected, projected);
    add(totals.booked, bookedKg);
    add(totals.actual, actual);
    if (projected) totals.projectedFarms++;
    if (actual) totals.usedFarms++;
    return {
      farmId,
      code: f.code,
      name: f.name,
      nutrients: NUTRIENTS.map((n) => fertiliserRow(n, projected?.[n] ?? null, bookedKg?.[n] ?? null, actual?.[n] ?? null)),
    };
  });
  const withRecords = farmsOut.length;
  return {
    bookingRound: hasRound,
    farmsWithRecords: withRecords,
    nutrients: withRecords
      ? NUTRIENTS.map((n) =>
          fertiliserRow(n, totals.projectedFarms ? totals.projected[n] : null, hasRound ? totals.booked[n] : null, totals.usedFarms ? totals.actual[n] : null),
        )
      : [],
    farms: farmsOut,
    note: withRecords
      ? `Over the ${withRecords} farm${withRecords === 1 ? '' : 's'} with records for ${v.season}. Booked nutrients follow each product's analysis as booked; use follows the fertiliser recorded on each farm, by its grade. A farm may also buy elsewhere or carry stock over.`
      : `No farm has records for ${v.season} yet: booked and used fertiliser are set against the projection when they come.`,
  };
}

export async function accountability(db: Db, which: 'latest' | 'first') {
  const all = await versionsWithSeasons(db);
  const chosen = [...new Map(all.map((v) => [v.outlookId, v])).values()].map((last) => {
    const mine = all.filter((v) => v.outlookId === last.outlookId);
    return which === 'first' ? mine[0]! : mine.at(-1)!;
  });
  const itemRows = await allItems(db);
  const seasonsOut: Awaited<ReturnType<typeof seasonReport>>[] = [];
  for (const v of chosen) seasonsOut.push(await seasonReport(db, v, itemRows));

  const codes = [...new Set(seasonsOut.flatMap((s) => s.items.map((i) => i.item)))];
  const summaryItems = codes.map((code) => {
    const rows = seasonsOut.flatMap((s) => s.items.filter((i) => i.item === code && i.errorPct !== null));
    const banded = rows.filter((r) => r.withinBand !== null);
    const first = seasonsOut.flatMap((s) => s.items).find((i) => i.item === code)!;
    return {
      item: code,
      name: first.name,
      seasons: rows.length,
      mape: mean(rows.map((r) => Math.abs(r.errorPct!))),
      bias: mean(rows.map((r) => r.errorPct!)),
      bandCoverage: banded.length ? banded.filter((r) => r.withinBand).length / banded.length : null,
    };
  });
  const priceCodes = [...new Set(seasonsOut.flatMap((s) => s.prices.map((p) => p.item)))];
  const summaryPrices = priceCodes.map((code) => {
    const rows = seasonsOut.flatMap((s) => s.prices.filter((p) => p.item === code && p.errorPct !== null));
    return {
      item: code,
      seasons: rows.length,
      mape: mean(rows.map((r) => Math.abs(r.errorPct!))),
      bias: mean(rows.map((r) => r.errorPct!)),
      rangeCoverage: rows.length ? rows.filter((r) => r.withinRange).length / rows.length : null,
    };
  });
  const farmCodes = [...new Map(seasonsOut.flatMap((s) => s.farms.map((f) => [f.farmId, f] as const))).values()];
  const summaryFarms = farmCodes
    .map((f) => {
      const rows = seasonsOut.flatMap((s) => s.farms.filter((x) => x.farmId === f.farmId).flatMap((x) => x.items.filter((i) => i.errorPct !== null)));
      return { farmId: f.farmId, code: f.code, name: f.name, comparisons: rows.length, mape: mean(rows.map((r) => Math.abs(r.errorPct!))), bias: mean(rows.map((r) => r.errorPct!)) };
    })
    .sort((a, b) => a.code.localeCompare(b.code));
  return {
    version: which,
    errorSign:
      'The error is the gap between the outlook and what was recorded, as a share of the recorded figure: positive when the outlook projected (or expected a price) too high, negative when too low.',
    seasons: seasonsOut,
    summary: { items: summaryItems, prices: summaryPrices, farms: summaryFarms },
  };
}
