import { describe, expect, it } from 'vitest';
import { backTestForecast, elasticitiesAt, fitForecastModel, fitProfitFunction, type NetputDataset } from '../server/estimation/index.js';
import { buildDemoCoop } from './demo-coop.js';
import { demoDataset as buildDataset } from './demo-dataset.js';
import { buildTechnology, DEMO_ITEMS, netputs, NUMERAIRE, valueHessian } from './technology.js';

const demo = buildDemoCoop();
const demoDataset = () => buildDataset(demo);

describe('the demo co-op (invented data)', () => {
  it('states the own-price elasticities its technology implies, the numeraire included', () => {
    // Closed form of a profit function's price Hessian in value terms: e_ii = S_ii / (p_i y_i)
    // (Diewert & Wales 1987, Econometrica 55(1): the NQ Hessian; homogeneity makes S's rows sum to zero).
    const tech = buildTechnology();
    const { codes, S } = valueHessian();
    const base = Object.fromEntries(DEMO_ITEMS.map((i) => [i.code, i.basePrice]));
    const y = netputs(tech, base, 400, 10);
    for (const it of DEMO_ITEMS) {
      const i = codes.indexOf(it.code);
      expect(S[i].reduce((a, b) => a + b, 0)).toBeCloseTo(0, 9);
      const closed = S[i][i] / (it.basePrice * y[it.code]);
      const h = 1e-6;
      const up = netputs(tech, { ...base, [it.code]: it.basePrice * (1 + h) }, 400, 10);
      expect((up[it.code] - y[it.code]) / y[it.code] / h).toBeCloseTo(closed, 4);
      expect(it.ownElasticity).toBeCloseTo(closed, 1); // stated to two digits
      expect(Math.abs(y[it.code])).toBeCloseTo(it.baseQuantity, 6);
    }
    // Constant returns to land: twice the land, twice every netput (Lau 1978, homogeneity of degree one in the fixed factor).
    const y2 = netputs(tech, base, 800, 10);
    for (const it of DEMO_ITEMS) expect(y2[it.code] / y[it.code]).toBeCloseTo(2, 12);
  });

  it('has farms from about 40 to 900 ha and records for every farm, season and item', () => {
    const sizes = demo.farms.map((f) => f.landHa);
    expect(Math.min(...sizes)).toBeGreaterThanOrEqual(35);
    expect(Math.min(...sizes)).toBeLessThan(60);
    expect(Math.max(...sizes)).toBeGreaterThan(700);
    expect(Math.max(...sizes)).toBeLessThanOrEqual(1000);
    expect(demo.records).toHaveLength(demo.farms.length * demo.seasons.length * DEMO_ITEMS.length);
    expect(demo.records.every((r) => r.quantity > 0)).toBe(true);
    expect(demo.farms.every((f) => f.ownerEmail.endsWith('@example.org'))).toBe(true);
  });

  it('shares the weather of a season across farms and crops: season means of wheat and canola per hectare move together', () => {
    const perHa = (item: string, season: string) => {
      const rows = demo.records.filter((r) => r.item === item && r.season === season);
      const land = new Map(demo.land.filter((l) => l.season === season).map((l) => [l.farm, l.landHa]));
      return rows.reduce((a, r) => a + r.quantity / land.get(r.farm)!, 0) / rows.length;
    };
    const w = demo.seasons.map((s) => perHa('wheat', s.label));
    const c = demo.seasons.map((s) => perHa('canola', s.label));
    // Detrended by differences, so the technical-change trend does not make the correlation.
    const dw = w.slice(1).map((v, k) => v - w[k]);
    const dc = c.slice(1).map((v, k) => v - c[k]);
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    const cov = (a: number[], b: number[]) => mean(a.map((v, k) => (v - mean(a)) * (b[k] - mean(b))));
    expect(cov(dw, dc) / Math.sqrt(cov(dw, dw) * cov(dc, dc))).toBeGreaterThan(0.5);
  });

  it('gives back its hired-labour response when fitted: own-price elasticity near the design', () => {
    const design = DEMO_ITEMS.find((i) => i.code === NUMERAIRE)!.ownElasticity;
    const ds = demoDataset();
    const k = ds.items.findIndex((i) => i.name === NUMERAIRE);
    // Per hectare (every netput divided by the farm's land), the form the records were made with.
    const perHa: NetputDataset = { ...ds, fixedFactors: [], fixed: [], quantities: ds.quantities.map((col) => col.map((q, i) => q / ds.fixed[0][i])) };
    const e1 = elasticitiesAt(fitProfitFunction(perHa, { numeraire: NUMERAIRE, trend: true }));
    expect(Math.abs(e1.elasticities[k][k] - design)).toBeLessThan(0.1);
    // The pooled form in levels with a land term is misspecified for these farms but still lands near it.
    const e2 = elasticitiesAt(fitProfitFunction(ds, { numeraire: NUMERAIRE, trend: true }));
    expect(Math.abs(e2.elasticities[k][k] - design)).toBeLessThan(0.15);
    // The forecasting model the outlook uses (per hectare, farm and season effects, season GLS): −0.287 measured.
    const e3 = elasticitiesAt(fitForecastModel(ds, { spec: 'per-hectare', numeraire: NUMERAIRE, trend: true }).fit);
    expect(Math.abs(e3.elasticities[k][k] - design)).toBeLessThan(0.1);
  });

  it('back-tests as the outlook does (last 5 seasons): every item no worse than the per-hectare rule, bands near 90 % by farm size and for the co-op', () => {
    // docs/forecasting.md §7 and §10. 20 farms × 5 seasons = 100 outcomes per item, about 35 per
    // third: one item's third has a binomial SE of ±5 %, so coverage is checked over all items
    // (245, 245 and 210 outcomes per third). Binomial SE of a share near 90 % on 245 outcomes:
    // √(0.9·0.1/245) = 1.9 %, so a calibrated band lands within 86.2–93.8 % (±2 SE, about 95 %) —
    // the 86–94 % checked here. The 87–93 % target of the ≥200-panel study (SE under 1 %) would fail
    // exactly calibrated, independent outcomes on one panel about one time in three (binomial, the
    // three thirds together: 35 %; 86–94 %: 11 %). Shared season shocks make the real spread wider
    // still (§10: the demo regenerated with other seeds). Measured: 86.9 / 92.2 / 92.4 %.
    const bt = backTestForecast(demoDataset(), { spec: 'per-hectare', numeraire: NUMERAIRE, trend: true, maxOrigins: 5, level: 0.9 });
    expect(bt.origins.filter((o) => o.error === null)).toHaveLength(5);
    for (const it of bt.items) {
      expect(it.beatsRule, it.item).toBe(true);
      expect(it.model.mdape!).toBeLessThanOrEqual(it.rules.perHectare!.mdape!);
    }
    for (let t = 0; t < 3; t++) {
      const held = bt.items.reduce((a, it) => a + it.coverage.byThird[t]!.held, 0);
      const total = bt.items.reduce((a, it) => a + it.coverage.byThird[t]!.total, 0);
      expect(held / total).toBeGreaterThanOrEqual(0.86);
      expect(held / total).toBeLessThanOrEqual(0.94);
    }
    const coopHeld = bt.items.reduce((a, it) => a + it.coverage.coop.held, 0);
    expect(coopHeld).toBeGreaterThanOrEqual(28); // of 35 (80 %); measured 31
  }, 120_000); // five fits and projections: a few seconds alone, longer on a busy machine
});
