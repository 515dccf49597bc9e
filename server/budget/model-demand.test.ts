import { beforeAll, describe, expect, it } from 'vitest';
import { elasticitiesAt, fitProfitFunction, generateNqPanel, projectSeason, type FitResult, type NetputDataset } from '../estimation/index.js';
import { demandAt, farmPoints, modelDemand, type NutrientItem } from './model-demand.js';
import { NUTRIENTS, type Nutrient } from './nutrients.js';
import { respondDemand } from './scenarios.js';

// Invented synthetic technology (test data only); the checks compare this module with the
// engine's own projection and elasticity functions and with exact re-evaluation of the model.
const items = [
  { name: 'wheat', role: 'output' as const, price: 200, quantity: 1500, ownElasticity: 0.4, trendShare: 0.01 },
  { name: 'nitrogen', role: 'input' as const, price: 1.1, quantity: 60_000, ownElasticity: -0.4, trendShare: 0.004 },
  { name: 'phosphate', role: 'input' as const, price: 0.95, quantity: 20_000, ownElasticity: -0.5 },
  { name: 'potash', role: 'input' as const, price: 0.7, quantity: 16_000, ownElasticity: -0.55 },
  { name: 'labour', role: 'input' as const, price: 19, quantity: 2600 },
];
const nutrientItems: Record<Nutrient, NutrientItem> = {
  nitrogen: { code: 'nitrogen', kgPerUnit: 1 },
  phosphate: { code: 'phosphate', kgPerUnit: 1 },
  potash: { code: 'potash', kgPerUnit: 1 },
};

let fit: FitResult;
let ds: NetputDataset;
beforeAll(() => {
  ds = generateNqPanel({ items, farms: 6, seasons: 12, firstSeason: 2012, seed: 5, noise: 0.03, priceSd: 0.1 }).dataset;
  fit = fitProfitFunction(ds, { numeraire: 'labour', trend: true });
});

const prices = { wheat: 210, nitrogen: 1.2, phosphate: 1.0, potash: 0.75 };

describe('nutrient demand from a model run', () => {
  it('projects each farm at its latest land and next season, as projectSeason does', () => {
    const md = modelDemand(fit, ds, { prices, items: nutrientItems });
    expect(md.season).toBe(2024);
    expect(md.farms).toHaveLength(6);
    expect(md.farms[0]!.season).toBe('2023');
    expect(md.farms[0]!.fixed.trend).toBe(2024 - 2012 + 1);
    // The engine's own co-op point projection at the same farms and prices (draws do not enter `point`).
    const proj = projectSeason(fit, { scenarios: md.prices, farms: md.farms.map((f) => ({ id: f.farm, fixed: { land: f.fixed.land! } })), draws: 100, season: 2024 });
    for (const n of NUTRIENTS) expect(md.demand[n]).toBeCloseTo(proj.scenarios[0]!.coop[n]!.point, 6);
  });

  it('takes prices not given from the last season of the snapshot (naive expectation)', () => {
    const md = modelDemand(fit, ds, { prices: { nitrogen: 1.2 }, items: nutrientItems });
    const last = ds.seasonYears.map((y, i) => [y, i] as const).filter(([y]) => y === 2023).map(([, i]) => ds.prices[0]![i]!);
    expect(md.priceBasis).toMatchObject({ nitrogen: 'given', wheat: 'last season' });
    expect(md.prices.wheat).toBeCloseTo(last.reduce((a, b) => a + b, 0) / last.length, 10);
  });

  it('for one farm, the co-op elasticities are the engine elasticities at that farm', () => {
    const one = { ...ds, farms: ds.farms!.map((f) => (f === 'F001' ? f : 'other')) };
    const points = farmPoints(fit, one, 2024).filter((p) => p.farm === 'F001');
    const el = elasticitiesAt(fit, { prices: { ...modelDemand(fit, ds, { prices, items: nutrientItems }).prices }, fixed: points[0]!.fixed });
    const sub = { ...one, seasons: [], seasonYears: [], farms: [], prices: one.prices.map(() => []), quantities: one.quantities.map(() => []), fixed: one.fixed.map(() => []), rows: [] } as NetputDataset;
    one.seasons.forEach((_, i) => {
      if (one.farms[i] !== 'F001') return;
      sub.seasons.push(one.seasons[i]!);
      sub.seasonYears.push(one.seasonYears[i]!);
      sub.farms!.push('F001');
      one.prices.forEach((c, k) => sub.prices[k]!.push(c[i]!));
      one.quantities.forEach((c, k) => sub.quantities[k]!.push(c[i]!));
      one.fixed.forEach((c, k) => sub.fixed[k]!.push(c[i]!));
      sub.rows.push(one.rows[i]!);
    });
    const md = modelDemand(fit, sub, { prices: Object.fromEntries(el.items.map((c, i) => [c, el.point.prices[i]!])), items: nutrientItems, season: 2024 });
    for (const i of NUTRIENTS)
      for (const j of NUTRIENTS) expect(md.elasticities[i][j]).toBeCloseTo(el.elasticities[el.items.indexOf(i)]![el.items.indexOf(j)]!, 10);
    expect(md.elasticities.nitrogen.nitrogen).toBeLessThan(0);
  });

  it('the constant-elasticity response matches exact re-evaluation for small price changes', () => {
    const md = modelDemand(fit, ds, { prices, items: nutrientItems });
    const points = farmPoints(fit, ds, md.season);
    for (const change of [1, -1]) {
      const approx = respondDemand(md.demand, md.elasticities, { nitrogen: change });
      const exact = demandAt(fit, points, { ...md.prices, nitrogen: md.prices.nitrogen! * (1 + change / 100) }, nutrientItems).total;
      // First-order agreement: the error is second order in the change (|Δ| = 1 %).
      for (const n of NUTRIENTS) expect(Math.abs(approx[n] / exact[n] - 1)).toBeLessThan(2e-4);
    }
  });

  it('when the model has no item for a nutrient, says which', () => {
    expect(() => modelDemand(fit, ds, { prices, items: { ...nutrientItems, potash: { code: 'kalium', kgPerUnit: 1 } } })).toThrow(/no input item "kalium" for potash/);
  });

  it('when an expected price names an unknown item or is not positive, names the field', () => {
    expect(() => modelDemand(fit, ds, { prices: { urea: 500 }, items: nutrientItems })).toThrow(/"urea" is not an item of the model run/);
    expect(() => modelDemand(fit, ds, { prices: { nitrogen: 0 }, items: nutrientItems })).toThrow(/must be above 0/);
  });
});
