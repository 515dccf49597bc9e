import { describe, expect, it } from 'vitest';
import { projectForecast, WelchTable } from './forecast.js';
import { normalQuantile, studentTQuantile } from './student-t.js';
import { fitForecastModel } from './panel.js';
import { generateForecastPanel, PER_HECTARE_ITEMS } from './synthetic-panel.js';

// Synthetic panel with known truth (invented data, server/estimation/synthetic-panel.ts): farm
// effects 15 %, season shocks 8 %, residual 10 % of the mean netput per ha, residual variance per ha
// ∝ land^−0.6. Method: docs/forecasting.md §4–§6.
const panel = generateForecastPanel({ items: PER_HECTARE_ITEMS, farms: 120, seasons: 8, firstSeason: 2010, seed: 11 });
const model = fitForecastModel(panel.dataset);

describe('per-hectare forecasting model on a panel with known truth', () => {
  it('is the default when land and farms are recorded, and says so in words', () => {
    expect(model.spec).toBe('per-hectare');
    expect(model.landFactor).toBe('land');
    expect(model.fit.layout.factors).toEqual([]);
    expect(model.specification).toMatch(/per hectare/);
  });

  it('recovers the size exponent of the residual variance (truth −0.6; ±0.3 for 960 observations)', () => {
    for (const d of model.errorScale!.exponent) expect(Math.abs(d - -0.6)).toBeLessThan(0.3);
  });

  it('recovers the between-farm spread of the farm effects (truth 15 % of the mean netput; ±40 %)', () => {
    PER_HECTARE_ITEMS.forEach((it, i) => {
      const tau = Math.sqrt(model.farmEffects!.tau2[model.fit.layout.items.findIndex((x) => x.name === it.name)]!);
      expect(Math.abs(tau / (0.15 * it.quantity) - 1), it.name).toBeLessThan(0.4);
      void i;
    });
  });

  it('shrinks farm effects toward zero (|shrunk| ≤ |farm mean|) and keeps the season effects centred', () => {
    for (const eff of model.seasonEffects!.effects) expect(Math.abs(eff.reduce((a, v) => a + v, 0))).toBeLessThan(1e-9 * (1 + Math.max(...eff.map(Math.abs))));
    expect(model.seasonEffects!.df).toBeGreaterThanOrEqual(2);
    expect(model.seasonEffects!.df).toBeLessThanOrEqual(7);
  });
});

describe('projectForecast', () => {
  const farms = model.farmEffects!.farms.slice(0, 30).map((farm, j) => ({ farm, fixed: { land: model.farmEffects!.lastLand[j]! } }));
  farms.push({ farm: 'NEW', fixed: { land: 200 } });
  const prices = { wheat: 260, canola: 500, nitrogen: 1250, diesel: 1.2, other: 100 };
  const proj = projectForecast(model, { farms, prices, draws: 2000, seed: 3 });

  it('gives 0 ≤ lower ≤ point ≤ upper for every farm, item and the co-op, and finite summaries', () => {
    for (const f of proj.farms)
      for (const q of Object.values(f.quantities)) {
        for (const v of Object.values(q)) expect(Number.isFinite(v)).toBe(true);
        expect(q.lower).toBeGreaterThanOrEqual(0);
        expect(q.lower).toBeLessThanOrEqual(q.point);
        expect(q.point).toBeLessThanOrEqual(q.upper);
      }
    for (const q of Object.values(proj.coop)) expect(q.lower <= q.point && q.point <= q.upper).toBe(true);
  });

  it('gives a new farm a wider band per hectare than a known farm of the same size', () => {
    const newFarm = proj.farms.at(-1)!;
    expect(newFarm.known).toBe(false);
    const known = projectForecast(model, { farms: [{ farm: farms[0]!.farm, fixed: { land: 200 } }], prices, draws: 2000, seed: 3 }).farms[0]!;
    expect(newFarm.quantities.wheat!.upper - newFarm.quantities.wheat!.lower).toBeGreaterThan(known.quantities.wheat!.upper - known.quantities.wheat!.lower);
  });

  it('is the same document for the same seed', () => {
    expect(projectForecast(model, { farms, prices, draws: 2000, seed: 3 })).toEqual(proj);
  });

  it('co-op band is wider than independent farm errors would give (the season shock is shared)', () => {
    const w = proj.coop.wheat!;
    const farmSds = proj.farms.map((f) => f.quantities.wheat!.sd);
    const independent = Math.sqrt(farmSds.reduce((a, s) => a + s * s, 0));
    expect(w.sd).toBeGreaterThan(1.5 * independent);
  });
});

describe('projectForecast options', () => {
  const farms = model.farmEffects!.farms.slice(0, 20).map((farm, j) => ({ farm, fixed: { land: model.farmEffects!.lastLand[j]! } }));
  const prices = { wheat: 260, canola: 500, nitrogen: 1250, diesel: 1.2, other: 100 };

  it('price risk (past relative errors of the expected prices) widens the bands but not the point', () => {
    const plain = projectForecast(model, { farms, prices, draws: 2000, seed: 5 });
    const risky = projectForecast(model, {
      farms,
      prices,
      draws: 2000,
      seed: 5,
      priceErrors: { wheat: [0.2, -0.15, 0.1, -0.25, 0.05], canola: [0.1, -0.2, 0.15, -0.1, 0] },
    });
    expect(risky.priceRisk).toBe(true);
    expect(risky.coop.wheat!.point).toBe(plain.coop.wheat!.point);
    expect(risky.coop.wheat!.upper - risky.coop.wheat!.lower).toBeGreaterThan(plain.coop.wheat!.upper - plain.coop.wheat!.lower);
  });

  it('bands at a lower level are narrower and nested', () => {
    const p90 = projectForecast(model, { farms, prices, draws: 2000, seed: 5 }).coop.canola!;
    const p50 = projectForecast(model, { farms, prices, draws: 2000, seed: 5, level: 0.5 }).coop.canola!;
    expect(p50.lower).toBeGreaterThan(p90.lower);
    expect(p50.upper).toBeLessThan(p90.upper);
    expect(p90.lower).toBe(p90.p5);
  });

  it('the pooled specification projects in levels with land as an ordinary factor', () => {
    const pooled = fitForecastModel(panel.dataset, { spec: 'pooled' });
    expect(pooled.spec).toBe('pooled');
    expect(pooled.fit.layout.factors).toEqual(['land']);
    const proj = projectForecast(pooled, { farms, prices, draws: 500, seed: 1 });
    expect(proj.seasonShockDf).toBeNull();
    for (const f of proj.farms) for (const q of Object.values(f.quantities)) expect(0 <= q.lower && q.lower <= q.point && q.point <= q.upper).toBe(true);
  });

  it('names what is wrong with bad options', () => {
    expect(() => projectForecast(model, { farms: [{ farm: 'X', fixed: {} }], draws: 500 })).toThrow(/land \(land\) must be given/);
    expect(() => projectForecast(model, { farms, priceErrors: { wheat: [0.1], canola: [0.1, 0.2] }, draws: 500 })).toThrow(/same number of past seasons/);
    expect(() => projectForecast(model, { farms, level: 1.2 })).toThrow(/level must lie between 0 and 1/);
  });
});

describe('Welch–Satterthwaite stretch with an estimated residual variance (docs/forecasting.md §6, step 8)', () => {
  // Welch (1947): ν* = V² / Σ v_k²/ν_k. A residual part v with Var(log v̂) = g enters with ν_r = 2/g.
  // The t quantiles are those of student-t.ts, checked against SciPy in student-t.test.ts.
  const z = normalQuantile(0.95);
  it('a residual part alone with g = 0.1 is a t with 20 degrees of freedom', () => {
    const st = new WelchTable(5, [0.05, 0.5, 0.95]).at(0, 0, 1, 0.1);
    expect(st.ratio(0.95)).toBeCloseTo(studentTQuantile(0.95, 20) / z, 12);
  });
  it('season part 0.5 (ν = 5) and residual part 0.5 (ν_r = 20): ν* = 1/(0.25/5 + 0.25/20) = 16', () => {
    const st = new WelchTable(5, [0.05, 0.5, 0.95]).at(0, 0.5, 0.5, 0.1);
    expect(st.ratio(0.95)).toBeCloseTo(studentTQuantile(0.95, 16) / z, 12);
    expect(st.sdFactor).toBeCloseTo(Math.sqrt(16 / 14), 12);
    // the same residual part counted as known: ν* = 1/(0.25/5) = 20
    expect(new WelchTable(5, [0.05, 0.5, 0.95]).at(0.5, 0.5).ratio(0.95)).toBeCloseTo(studentTQuantile(0.95, 20) / z, 12);
  });
});
