import { describe, expect, it } from 'vitest';
import { runCoverageStudy } from './coverage-study.js';

// Small seeded versions of the simulation study with known truth (docs/forecasting.md §6; the full
// study with ≥ 200 replicates is bench/forecast-coverage-bench.ts, results in
// bench/results/forecast-coverage.md). Each panel is fitted on all seasons but the last, which is
// projected at its actual prices and land.
describe('90 % bands with known truth (small seeded study, 8 seasons fitted)', () => {
  // 12 panels × 50 farms × 5 items, the default model (season GLS, docs/forecasting.md §5);
  // measured: thirds 90.8 / 90.4 / 92.5 %, co-op 55 of 60 (without the season GLS: 90.8 / 90.5 /
  // 91.8 %, 54 of 60).
  const r = runCoverageStudy({ replicates: 12, farms: 50, seasons: 8, seed: 321, draws: 1000 });

  it('hold about 90 % of farm outcomes in every third of farm size', () => {
    // About 1,000 outcomes per third, but the farms of one panel share its season shock, so the
    // effective sample is far smaller (about 12 panels × 5 items): tolerance 86–95 %; the benchmark
    // holds the 87–93 % target.
    for (const t of r.all.thirds) {
      expect(t.total).toBeGreaterThan(950);
      expect(t.share).toBeGreaterThan(0.86);
      expect(t.share).toBeLessThan(0.95);
    }
  });

  it('hold most co-op totals (60 item-panels: at least 48, i.e. 80 %; a binomial 90 % rate falls below 48 with probability under 1 %)', () => {
    expect(r.all.coop.total).toBe(60);
    expect(r.all.coop.held).toBeGreaterThanOrEqual(48);
  });

  it('small farms are not covered much more often than large ones (the old bands: 100 % against 82 %)', () => {
    expect(Math.abs(r.all.thirds[0]!.share - r.all.thirds[2]!.share)).toBeLessThan(0.06);
  });

  it('beat the plain per-hectare rule for every item (median farm error)', () => {
    for (const k of r.skill) expect(k.model, k.item).toBeLessThanOrEqual(k.perHectare);
  });
});

describe('90 % bands with known truth, few seasons (5 fitted): wider, but not far wider than they need be', () => {
  // 16 panels × 60 farms, with the season GLS of docs/forecasting.md §5 (the default). Measured:
  // thirds 90.8 / 92.9 / 92.2 %, all farms 92.0 %, co-op 75 of 80; model / per-hectare rule: wheat
  // 0.81, canola 0.86, nitrogen 1.06, diesel 0.83, other 0.53 (the 200-panel benchmark: every item
  // below 1). The earlier scale-mixture bands held about 95 % here (bench: 95.3 % over 200 panels).
  const r = runCoverageStudy({ replicates: 16, farms: 60, seasons: 5, seed: 777, draws: 1000 });

  it('hold 86–94 % of farm outcomes in every third of farm size', () => {
    for (const t of r.all.thirds) {
      expect(t.share).toBeGreaterThan(0.86);
      expect(t.share).toBeLessThan(0.94);
    }
  });

  it('hold at least 64 of 80 co-op totals (80 %)', () => {
    expect(r.all.coop.total).toBe(80);
    expect(r.all.coop.held).toBeGreaterThanOrEqual(64);
  });

  it('farm projections beat the per-hectare rule for diesel and on average over the items', () => {
    // Without the season GLS (seasonGls: false) the 200-panel benchmark had diesel at 1.08.
    const ratio = (item: string) => {
      const k = r.skill.find((x) => x.item === item)!;
      return k.model / k.perHectare;
    };
    expect(ratio('diesel')).toBeLessThan(0.95);
    const mean = r.skill.reduce((a, k) => a + k.model / k.perHectare, 0) / r.skill.length;
    expect(mean).toBeLessThan(0.9);
  });
});
