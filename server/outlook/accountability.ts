/**
 * Forecast against outcome: after a season, the farm records of that season (deliveries and
 * purchases, when entered) and its mean prices are set against the published outlook, per item and
 * per farm, season after season. Errors follow the back-test's sign: (projected − actual) / actual,
 * positive when the outlook projected too much (server/jobs/fit-task.ts `backtest`).
 */
import { and, asc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { farmRecords, items, outlookVersionFarms, outlookVersions, seasons } from '../db/schema/index.js';
import { priceSeries } from '../prices/prices-repository.js';
import type { Comparison, FarmOutlook, OutlookSnapshot } from '../../shared/outlook-types.js';

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

type VersionRow = { id: number; outlookId: number; version: number; seasonId: number; snapshot: unknown; publishedAt: Date; season: string; startYear: number };

async function seasonReport(db: Db, v: VersionRow, itemRows: (typeof items.$inferSelect)[]) {
  const snap = v.snapshot as OutlookSnapshot;
  const parts = (await db.select({ data: outlookVersionFarms.data }).from(outlookVersionFarms).where(eq(outlookVersionFarms.versionId, v.id))).map((p) => p.data as FarmOutlook);
  const codes = snap.projection.coop.items.map((i) => i.item);
  const ids = itemRows.filter((i) => codes.includes(i.code));
  const recs = parts.length
    ? await db
        .select({ farmId: farmRecords.farmId, itemId: farmRecords.itemId, quantity: farmRecords.quantity })
        .from(farmRecords)
        .where(and(eq(farmRecords.seasonId, v.seasonId), inArray(farmRecords.farmId, parts.map((p) => p.farmId)), inArray(farmRecords.itemId, ids.map((i) => i.id))))
    : [];
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
  };
}

export async function accountability(db: Db, which: 'latest' | 'first') {
  const all = await db
    .select({ id: outlookVersions.id, outlookId: outlookVersions.outlookId, version: outlookVersions.version, seasonId: outlookVersions.seasonId, snapshot: outlookVersions.snapshot, publishedAt: outlookVersions.publishedAt, season: seasons.label, startYear: seasons.startYear })
    .from(outlookVersions)
    .innerJoin(seasons, eq(seasons.id, outlookVersions.seasonId))
    .orderBy(asc(seasons.startYear), asc(outlookVersions.version));
  const chosen = [...new Map(all.map((v) => [v.outlookId, v])).values()].map((last) => {
    const mine = all.filter((v) => v.outlookId === last.outlookId);
    return which === 'first' ? mine[0]! : mine.at(-1)!;
  });
  const itemRows = await db.select().from(items);
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
