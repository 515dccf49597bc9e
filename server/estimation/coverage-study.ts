/**
 * Simulation study of band coverage with known truth (docs/forecasting.md §6): panels drawn from
 * the per-hectare technology of synthetic-panel.ts with farm effects, size-scaled errors and season
 * shocks; the model is fitted to every season but the last, which is projected at its actual prices
 * and land; the share of outcomes inside the bands is counted per third of farm size (land
 * terciles of each replicate) and for the co-op total. Used by the test (a few replicates) and by
 * bench/forecast-coverage-bench.ts (at least 200).
 */
import { subset } from './backtest.js';
import { projectForecast } from './forecast.js';
import { fitForecastModel, type ForecastModelOptions } from './panel.js';
import { generateForecastPanel, PER_HECTARE_ITEMS, type ForecastPanelSpec } from './synthetic-panel.js';

export interface CoverageStudyOptions {
  replicates: number;
  farms: number;
  /** Seasons fitted (one more is drawn and projected). */
  seasons: number;
  seed: number;
  draws?: number;
  level?: number;
  /** Other settings of the synthetic panel. */
  panel?: Partial<ForecastPanelSpec>;
  /** Options of the fitted model (default: the per-hectare model's defaults). */
  model?: ForecastModelOptions;
}

export interface CoverageCell {
  held: number;
  total: number;
  share: number;
}

export interface CoverageStudyResult {
  level: number;
  replicates: number;
  farms: number;
  seasons: number;
  /** Per item: thirds of farm size (smallest first), all farms, co-op totals. */
  items: { item: string; thirds: CoverageCell[]; farms: CoverageCell; coop: CoverageCell }[];
  /** All items together. */
  all: { thirds: CoverageCell[]; farms: CoverageCell; coop: CoverageCell };
  /** Mean t degrees of freedom of the season shock. */
  meanDf: number;
  /**
   * Skill per item: median absolute percentage error of the farm projections (points) over every
   * replicate's farm outcomes with a positive actual, against the plain rules (last season's
   * quantity; the farm's own average per hectare over the fitted seasons × its land).
   */
  skill: { item: string; model: number; lastSeason: number; perHectare: number }[];
}

const cell = (): CoverageCell => ({ held: 0, total: 0, share: 0 });

export function runCoverageStudy(o: CoverageStudyOptions): CoverageStudyResult {
  const level = o.level ?? 0.9;
  const items = PER_HECTARE_ITEMS;
  const per = items.map(() => ({ thirds: [cell(), cell(), cell()], farms: cell(), coop: cell() }));
  let dfSum = 0;
  const ape = items.map(() => ({ model: [] as number[], last: [] as number[], perHa: [] as number[] }));
  for (let r = 0; r < o.replicates; r++) {
    const { dataset: ds } = generateForecastPanel({ items, farms: o.farms, seasons: o.seasons + 1, firstSeason: 2000, seed: o.seed + r, ...o.panel });
    const last = 2000 + o.seasons;
    const all = ds.rows.map((_, i) => i);
    const train = all.filter((i) => ds.seasonYears[i]! < last);
    const test = all.filter((i) => ds.seasonYears[i] === last);
    const model = fitForecastModel(subset(ds, train), o.model);
    dfSum += model.seasonEffects?.df ?? 0;
    const lands = test.map((i) => ds.fixed[0]![i]!);
    const sorted = lands.slice().sort((a, b) => a - b);
    const c1 = sorted[Math.floor(sorted.length / 3)]!;
    const c2 = sorted[Math.floor((2 * sorted.length) / 3)]!;
    const proj = projectForecast(model, {
      farms: test.map((i) => ({
        farm: ds.farms![i]!,
        fixed: { land: ds.fixed[0]![i]! },
        prices: Object.fromEntries(items.map((it, k) => [it.name, ds.prices[k]![i]!])),
      })),
      draws: o.draws ?? 2000,
      seed: o.seed + r,
      level,
      season: last,
    });
    // the plain rules from the fitted seasons of each farm
    const hist = new Map<string, { lastYear: number; last: number[]; perHa: number[]; count: number }>();
    for (const i of train) {
      const f = ds.farms![i]!;
      const L = ds.fixed[0]![i]!;
      const h = hist.get(f) ?? { lastYear: -1, last: items.map(() => 0), perHa: items.map(() => 0), count: 0 };
      items.forEach((_, k) => (h.perHa[k]! += ds.quantities[k]![i]! / L));
      h.count++;
      if (ds.seasonYears[i]! > h.lastYear) {
        h.lastYear = ds.seasonYears[i]!;
        h.last = items.map((_, k) => ds.quantities[k]![i]!);
      }
      hist.set(f, h);
    }
    items.forEach((it, k) => {
      const acc = per[k]!;
      let total = 0;
      test.forEach((i, f) => {
        const q = ds.quantities[k]![i]!;
        const h = hist.get(ds.farms![i]!);
        if (q > 0 && h) {
          const pt = proj.farms[f]!.quantities[it.name]!.point;
          ape[k]!.model.push(Math.abs(pt - q) / q);
          ape[k]!.last.push(Math.abs(h.last[k]! - q) / q);
          ape[k]!.perHa.push(Math.abs((h.perHa[k]! / h.count) * ds.fixed[0]![i]! - q) / q);
        }
        total += q;
        const b = proj.farms[f]!.quantities[it.name]!;
        const inside = q >= b.lower && q <= b.upper;
        const t = acc.thirds[lands[f]! < c1 ? 0 : lands[f]! < c2 ? 1 : 2]!;
        t.total++;
        acc.farms.total++;
        if (inside) {
          t.held++;
          acc.farms.held++;
        }
      });
      const cb = proj.coop[it.name]!;
      acc.coop.total++;
      if (total >= cb.lower && total <= cb.upper) acc.coop.held++;
    });
  }
  const fin = (c: CoverageCell): CoverageCell => ({ ...c, share: c.total ? c.held / c.total : 0 });
  const sum = (cs: CoverageCell[]): CoverageCell => fin(cs.reduce((a, c) => ({ held: a.held + c.held, total: a.total + c.total, share: 0 }), cell()));
  return {
    level,
    replicates: o.replicates,
    farms: o.farms,
    seasons: o.seasons,
    items: items.map((it, k) => ({ item: it.name, thirds: per[k]!.thirds.map(fin), farms: fin(per[k]!.farms), coop: fin(per[k]!.coop) })),
    all: {
      thirds: [0, 1, 2].map((t) => sum(per.map((p) => p.thirds[t]!))),
      farms: sum(per.map((p) => p.farms)),
      coop: sum(per.map((p) => p.coop)),
    },
    meanDf: dfSum / o.replicates,
    skill: items.map((it, k) => ({ item: it.name, model: 100 * median(ape[k]!.model), lastSeason: 100 * median(ape[k]!.last), perHectare: 100 * median(ape[k]!.perHa) })),
  };
}

function median(xs: number[]): number {
  if (!xs.length) return NaN;
  const s = xs.slice().sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}
