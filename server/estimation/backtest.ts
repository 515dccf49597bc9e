/**
 * Rolling-origin back-test of the forecasting model (docs/forecasting.md §7; Tashman 2000): for
 * every season t with enough history, fit on the seasons up to t and project season t + 1 for the
 * farms recorded in it, at the prices they actually faced and their actual land, then compare with
 * what happened and with two plain rules — last season's quantity, and the farm's own average
 * quantity per hectare × its land. Reports per item the median absolute percentage error (farm
 * outcomes with a positive actual), RMSE, the error of the co-op total, the ratios to each rule, and
 * the coverage of the model's bands per third of farm size and for the co-op total (Christoffersen
 * 1998: the share held should be the stated level).
 */
import type { BackTestItem, BackTestOrigin, BackTestResult, CoverageCount, ErrorSummary } from '../../shared/forecast-types.js';
import type { NetputDataset } from './dataset.js';
import { isEstimationInputError } from './errors.js';
import { projectForecast } from './forecast.js';
import { fitForecastModel, landFactorIndex, type ForecastModelOptions } from './panel.js';

export type { BackTestItem, BackTestOrigin, BackTestResult, CoverageCount, ErrorSummary } from '../../shared/forecast-types.js';

export interface BackTestOptions extends ForecastModelOptions {
  /** Central probability of the bands (default 0.9). */
  level?: number;
  /** Simulation draws per origin (default 2000). */
  draws?: number;
  seed?: number;
  /** Fewest seasons a fit may use (default 3). */
  minSeasons?: number;
  /** Only the most recent origins (default: every origin). */
  maxOrigins?: number;
  /** Called after each origin with the share done. */
  onProgress?: (share: number, stage: string) => void;
}

interface Pair {
  act: number;
  model: number;
  last: number;
  perHa: number | null;
  lower: number;
  upper: number;
  size: number;
}

/** Run the back-test. Pure and deterministic (same seed, same result). */
export function backTestForecast(ds: NetputDataset, options: BackTestOptions = {}): BackTestResult {
  const level = options.level ?? 0.9;
  const draws = options.draws ?? 2000;
  const seed = options.seed ?? 1;
  const minSeasons = Math.max(2, options.minSeasons ?? 3);
  const landIdx = landFactorIndex(ds, options.land);
  const years = [...new Set(ds.seasonYears)].sort((a, b) => a - b);
  const labelOf = new Map<number, string>();
  ds.seasonYears.forEach((y, o) => labelOf.has(y) || labelOf.set(y, ds.seasons[o]!));
  let targets = years.slice(minSeasons);
  if (options.maxOrigins !== undefined) targets = targets.slice(Math.max(0, targets.length - options.maxOrigins));
  const n = ds.items.length;
  const pairs: Pair[][] = ds.items.map(() => []);
  const coopRows: { act: number; model: number; last: number; perHa: number | null; lower: number; upper: number }[][] = ds.items.map(() => []);
  const origins: BackTestOrigin[] = [];
  let spec: BackTestResult['spec'] = options.spec ?? (landIdx >= 0 && ds.farms ? 'per-hectare' : 'pooled');
  const farmOf = (o: number): string => (ds.farms ? ds.farms[o]! : 'co-op');

  targets.forEach((year, ti) => {
    const train = indices(ds, (o) => ds.seasonYears[o]! < year);
    const test = indices(ds, (o) => ds.seasonYears[o] === year);
    const fittedThrough = labelOf.get(Math.max(...train.map((o) => ds.seasonYears[o]!)))!;
    const origin: BackTestOrigin = { fittedThrough, season: labelOf.get(year)!, farms: 0, coop: {}, error: null };
    origins.push(origin);
    options.onProgress?.(ti / targets.length, `Back-testing ${origin.season} (${ti + 1} of ${targets.length})`);
    // history of each farm: last season's quantities and average per hectare
    const last = new Map<string, { year: number; q: number[] }>();
    const perHa = new Map<string, { sum: number[]; count: number }>();
    for (const o of train) {
      const f = farmOf(o);
      const prev = last.get(f);
      if (!prev || ds.seasonYears[o]! >= prev.year) last.set(f, { year: ds.seasonYears[o]!, q: ds.quantities.map((c) => c[o]!) });
      if (landIdx >= 0) {
        const L = ds.fixed[landIdx]![o]!;
        if (L > 0) {
          const acc = perHa.get(f) ?? { sum: new Array<number>(n).fill(0), count: 0 };
          ds.quantities.forEach((c, i) => (acc.sum[i]! += c[o]! / L));
          acc.count++;
          perHa.set(f, acc);
        }
      }
    }
    const evalObs = test.filter((o) => last.has(farmOf(o)));
    if (!evalObs.length) {
      origin.error = 'no farm of this season has records in the seasons before it';
      return;
    }
    try {
      const model = fitForecastModel(subset(ds, train), options);
      spec = model.spec;
      const proj = projectForecast(model, {
        farms: evalObs.map((o) => ({
          farm: farmOf(o),
          fixed: Object.fromEntries(ds.fixedFactors.map((f, k) => [f, ds.fixed[k]![o]!])),
          prices: Object.fromEntries(ds.items.map((it, i) => [it.name, ds.prices[i]![o]!])),
        })),
        season: year,
        level,
        draws,
        seed: seed + ti,
      });
      origin.farms = evalObs.length;
      ds.items.forEach((it, i) => {
        let act = 0;
        let lastSum = 0;
        let haSum = 0;
        let haOk = landIdx >= 0;
        evalObs.forEach((o, j) => {
          const f = farmOf(o);
          const q = proj.farms[j]!.quantities[it.name]!;
          const ha = perHa.get(f);
          const L = landIdx >= 0 ? ds.fixed[landIdx]![o]! : 0;
          const ruleHa = ha && landIdx >= 0 ? (ha.sum[i]! / ha.count) * L : null;
          if (ruleHa === null) haOk = false;
          const p: Pair = {
            act: ds.quantities[i]![o]!,
            model: q.point,
            last: last.get(f)!.q[i]!,
            perHa: ruleHa,
            lower: q.lower,
            upper: q.upper,
            size: landIdx >= 0 ? L : last.get(f)!.q[i]!,
          };
          pairs[i]!.push(p);
          act += p.act;
          lastSum += p.last;
          haSum += ruleHa ?? 0;
        });
        const c = proj.coop[it.name]!;
        coopRows[i]!.push({ act, model: c.point, last: lastSum, perHa: haOk ? haSum : null, lower: c.lower, upper: c.upper });
        origin.coop[it.name] = { point: c.point, lower: c.lower, upper: c.upper, actual: act };
      });
    } catch (e) {
      if (!isEstimationInputError(e)) throw e;
      origin.error = (e as Error).message;
    }
  });
  options.onProgress?.(1, 'Back-test done');

  // Thirds of farm size: land terciles over every compared outcome (the item's own size without land).
  const sizes = (pairs[0] ?? []).map((p) => p.size).sort((a, b) => a - b);
  const cuts: [number, number] | null = landIdx >= 0 && sizes.length >= 3 ? [quantileSorted(sizes, 1 / 3), quantileSorted(sizes, 2 / 3)] : null;
  const items: BackTestItem[] = ds.items.map((it, i) => {
    const ps = pairs[i]!;
    const cr = coopRows[i]!;
    const model = errors(ps, (p) => p.model, cr, (c) => c.model);
    const lastSeason = errors(ps, (p) => p.last, cr, (c) => c.last);
    const withHa = landIdx >= 0 && ps.every((p) => p.perHa !== null);
    const perHectare = withHa ? errors(ps, (p) => p.perHa!, cr, (c) => c.perHa ?? NaN) : null;
    const itemCuts = cuts ?? (() => {
      const s = ps.map((p) => p.size).sort((a, b) => a - b);
      return s.length >= 3 ? ([quantileSorted(s, 1 / 3), quantileSorted(s, 2 / 3)] as [number, number]) : ([Infinity, Infinity] as [number, number]);
    })();
    const third = (size: number): number => (size <= itemCuts[0] ? 0 : size <= itemCuts[1] ? 1 : 2);
    const byThird: [CoverageCount, CoverageCount, CoverageCount] = [count(), count(), count()];
    const farms = count();
    for (const p of ps) {
      const inside = p.act >= p.lower && p.act <= p.upper;
      const t = byThird[third(p.size)]!;
      t.total++;
      farms.total++;
      if (inside) {
        t.held++;
        farms.held++;
      }
    }
    const coop = count();
    for (const c of cr) {
      coop.total++;
      if (c.act >= c.lower && c.act <= c.upper) coop.held++;
    }
    for (const c of [...byThird, farms, coop]) c.share = c.total ? c.held / c.total : null;
    const ratio = (a: ErrorSummary, b: ErrorSummary) => ({ mdape: div(a.mdape, b.mdape), rmse: div(a.rmse, b.rmse) });
    const ref = perHectare ?? lastSeason;
    return {
      item: it.name,
      role: it.role,
      model,
      rules: { lastSeason, perHectare },
      ratios: { lastSeason: ratio(model, lastSeason), perHectare: perHectare ? ratio(model, perHectare) : null },
      coverage: { byThird, farms, coop },
      beatsRule: model.mdape !== null && ref.mdape !== null && model.mdape <= ref.mdape,
    };
  });
  return { spec, level, thirds: { by: landIdx >= 0 ? 'land' : 'quantity', cuts }, origins, items };
}

function count(): CoverageCount {
  return { held: 0, total: 0, share: null };
}

function div(a: number | null, b: number | null): number | null {
  return a === null || b === null || !(b > 0) ? null : a / b;
}

function errors<C>(ps: Pair[], pred: (p: Pair) => number, coops: C[], coopPred: (c: C) => number): ErrorSummary {
  const ape = ps.filter((p) => p.act > 0).map((p) => Math.abs(pred(p) - p.act) / p.act).sort((a, b) => a - b);
  let se = 0;
  for (const p of ps) se += (pred(p) - p.act) ** 2;
  const ce = coops
    .map((c) => ({ act: (c as { act: number }).act, pred: coopPred(c) }))
    .filter((c) => c.act > 0 && Number.isFinite(c.pred))
    .map((c) => Math.abs(c.pred - c.act) / c.act);
  return {
    mdape: ape.length ? 100 * quantileSorted(ape, 0.5) : null,
    rmse: ps.length ? Math.sqrt(se / ps.length) : null,
    coopError: ce.length ? (100 * ce.reduce((a, v) => a + v, 0)) / ce.length : null,
    count: ps.length,
  };
}

function quantileSorted(s: number[], p: number): number {
  const h = (s.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, s.length - 1);
  return s[lo]! + (h - lo) * (s[hi]! - s[lo]!);
}

function indices(ds: NetputDataset, keep: (o: number) => boolean): number[] {
  const out: number[] = [];
  for (let o = 0; o < ds.rows.length; o++) if (keep(o)) out.push(o);
  return out;
}

/** The observations `idx` of a dataset, as a dataset. */
export function subset(ds: NetputDataset, idx: number[]): NetputDataset {
  return {
    ...ds,
    seasons: idx.map((o) => ds.seasons[o]!),
    seasonYears: idx.map((o) => ds.seasonYears[o]!),
    farms: ds.farms ? idx.map((o) => ds.farms![o]!) : null,
    prices: ds.prices.map((c) => idx.map((o) => c[o]!)),
    quantities: ds.quantities.map((c) => idx.map((o) => c[o]!)),
    fixed: ds.fixed.map((c) => idx.map((o) => c[o]!)),
    rows: idx.map((o) => ds.rows[o]!),
  };
}

const pct = (v: number): string => `${Math.round(v)} %`;

/**
 * The back-test in plain sentences, one per item, e.g. "wheat: this model's farm projections were
 * 18 % closer than last season's figures and 6 % closer than each farm's own average per hectare ×
 * its land; its 90 % bands held 88 % of farm outcomes (smallest third of farms 85 %, middle 90 %,
 * largest 89 %) and 9 of 10 co-op totals."
 */
export function describeBackTest(result: BackTestResult): string[] {
  const done = result.origins.filter((o) => o.error === null).length;
  if (!done) return ['There are too few seasons to test the model on past seasons: it needs at least four seasons of records.'];
  const lvl = pct(100 * result.level);
  const compare = (ratio: number | null, what: string): string | null => {
    if (ratio === null) return null;
    const d = Math.round(100 * (1 - ratio));
    if (d === 0) return `as close as ${what}`;
    return d > 0 ? `${d} % closer than ${what}` : `${-d} % further off than ${what}`;
  };
  const lines = result.items.map((it) => {
    const parts = [
      compare(it.ratios.lastSeason.mdape, "last season's figures"),
      it.ratios.perHectare ? compare(it.ratios.perHectare.mdape, "each farm's own average per hectare × its land") : null,
    ].filter((x): x is string => x !== null);
    const skill = parts.length ? `this model's farm projections were ${parts.join(' and ')}` : "this model's farm projections could not be compared with the plain rules";
    const cov = it.coverage;
    const thirds = cov.byThird.every((t) => t.total > 0)
      ? ` (smallest third of farms ${pct(100 * cov.byThird[0].share!)}, middle ${pct(100 * cov.byThird[1].share!)}, largest ${pct(100 * cov.byThird[2].share!)})`
      : '';
    const band = cov.farms.total
      ? `its ${lvl} bands held ${pct(100 * cov.farms.share!)} of farm outcomes${thirds} and ${cov.coop.held} of ${cov.coop.total} co-op totals`
      : 'no farm outcome could be compared with its band';
    return `${it.item}: ${skill}; ${band}.`;
  });
  const losing = result.items.filter((it) => !it.beatsRule).map((it) => it.item);
  lines.push(
    `Tested on ${done} past season${done === 1 ? '' : 's'}, each projected from the seasons before it at the prices and land that came.` +
      (losing.length ? ` For ${losing.join(', ')} the model did not beat the plain rule; treat its projection with care.` : ''),
  );
  return lines;
}
