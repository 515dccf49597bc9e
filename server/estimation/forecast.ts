/**
 * Predictive distributions of next season's supply and input use, per farm and for the co-op, by
 * simulation (docs/forecasting.md §6). Each draw s carries
 *   θ_s = θ̂ + C_f ε_s + C_λ ε'_s              parameter uncertainty (farm-level and season parts)
 *   λ_s = Σ_λ^{1/2} z_s                       the season shock, shared by every farm, joint across items
 *   k_s                                        optionally a past season's relative price error (price risk)
 * (forecast-draws.ts with seasonScale 'plug-in') and each farm adds its own farm-effect uncertainty
 * and residual, normal with the size-scaled variance. A farm's quantity is
 * L·max(0, sign·(x(p)'θ_s + λ_s + μ_f + u_fs)) (never negative); the co-op's is the sum over farms
 * within the draw, so the shared shock moves every farm together.
 * Few seasons: Σ_λ rests on ν degrees of freedom, so every reported quantity's band is that of a
 * Student t with its Welch–Satterthwaite degrees of freedom ν* = V²/(V_season²/ν) — the season
 * parts' share of its predictive variance decides how much it widens (a co-op total about as much as
 * a t_ν, a farm dominated by its own residual hardly at all). The residual variance σ̂²(L/L̄)^δ̂ is an
 * estimate too: it enters with ν_r = 2/Var(log v̂), Var(log v̂) = 2/d + x²·Var(δ̂) by the delta method
 * (x = log(L/L̄)), so ν* = V²/(V_season²/ν + v²/ν_r) — widest far from the centre of log-size.
 *
 * Speed: the parts shared by all farms (parameter draws, season shock, price error) are computed
 * once per draw; per farm and draw only the farm's own normal is added. Farms take their normals
 * from one seeded pool at distinct cyclic offsets: every farm's draws are exactly N(0, 1) and
 * independent of the shared parts, and within a draw no two farms share a normal (as long as the
 * pool is at least as long as the farm list), so the co-op sum of the idiosyncratic parts has the
 * right distribution in every draw. When no regressor differs between farms, a farm's quantiles
 * are its own level plus those of (shared part + a·η), computed once per item on a grid of a and
 * interpolated; otherwise they come from a histogram of the farm's draws over a pilot range.
 * Co-op quantiles are exact order statistics.
 * Projections are estimates, not advice.
 */
import type { ForecastProjection, ForecastQuantity, ProjectionHeader } from '../../shared/forecast-types.js';
import { drawSettings } from './draw-options.js';
import { EstimationInputError } from './errors.js';
import { drawSharedParts } from './forecast-draws.js';
import { formOf } from './forms.js';
import type { ModelData } from './model.js';
import type { ForecastModel } from './panel.js';
import { PROJECTION_CAUTION } from './projection.js';
import { normalQuantile, studentTQuantile } from './student-t.js';

export type { FarmForecast, ForecastProjection, ForecastQuantity } from '../../shared/forecast-types.js';

export interface ForecastFarm {
  farm: string;
  /** Fixed factors in levels by name, land included (required for the per-hectare model). */
  fixed: Record<string, number>;
  /** Prices this farm faces; items not named take the projection's `prices`. */
  prices?: Record<string, number>;
}

export interface ForecastOptions {
  farms: ForecastFarm[];
  /** Prices every farm faces unless its own say otherwise; items named nowhere: sample means. */
  prices?: Record<string, number>;
  /** Season year projected (trend); default the season after the history's last. */
  season?: number;
  /** Central probability of the bands (default 0.9). */
  level?: number;
  /** Simulation draws (default 10000, at least 100). */
  draws?: number;
  seed?: number;
  /**
   * Price risk: past relative errors (actual − expected) / expected of the expectation method, by
   * item, one entry per past season (all the same length; items not named: no error). Each draw
   * takes one past season's errors for all items together.
   */
  priceErrors?: Record<string, number[]>;
  /** Include parameter uncertainty (default true). */
  parameterUncertainty?: boolean;
}

interface RegressorSet {
  /** values[i][r]: regressor r of equation i, one value per farm. */
  values: Float64Array[][];
}

/** The header fields a projection and a contracted evaluation open with (their prices, curvature share and caution differ). */
export function projectionHeader(
  model: ForecastModel,
  season: number,
  settings: { draws: number; seed: number; level: number },
): Pick<ProjectionHeader, 'spec' | 'season' | 'level' | 'draws' | 'seed' | 'items'> {
  return {
    spec: model.spec,
    season,
    level: settings.level,
    draws: settings.draws,
    seed: settings.seed,
    items: model.fit.layout.items.map((it) => ({ name: it.name, role: it.role })),
  };
}

/** Project every farm and the co-op for one season. */
export function projectForecast(model: ForecastModel, options: ForecastOptions): ForecastProjection {
  const { fit } = model;
  const { layout } = fit;
  const form = formOf(layout.form);
  const n = layout.items.length;
  const k = fit.theta.length;
  const { draws: S, seed, level } = drawSettings(options, { what: 'the projection', defaultDraws: 10000 });
  const farms = options.farms;
  const F = farms.length;
  const perHa = model.spec === 'per-hectare';
  const season = options.season ?? fit.seasonYears.last + 1;
  const trendIdx = layout.trendOrigin !== null ? layout.factors.indexOf('trend') : -1;
  const itemIndex = new Map(layout.items.map((it, i) => [it.name, i]));

  // Prices per farm (layout order).
  const common = fit.means.prices.slice();
  for (const [name, v] of Object.entries(options.prices ?? {})) {
    const i = itemIndex.get(name);
    if (i === undefined) throw new EstimationInputError(`prices: "${name}" is not an item of the model`);
    if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`prices: the price of ${name} must be a positive number, got ${v}`);
    common[i] = v;
  }
  const farmPrices = farms.map((farm) => {
    const p = common.slice();
    for (const [name, v] of Object.entries(farm.prices ?? {})) {
      const i = itemIndex.get(name);
      if (i === undefined) throw new EstimationInputError(`farm ${farm.farm}: "${name}" is not an item of the model`);
      if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`farm ${farm.farm}: the price of ${name} must be a positive number, got ${v}`);
      p[i] = v;
    }
    return p;
  });
  const samePrices = farmPrices.every((p) => p.every((v, i) => v === farmPrices[0]![i]));

  // Land and factors (per hectare for the per-hectare model).
  const landName = model.landFactor;
  const landOf = new Float64Array(F).fill(1);
  const known = new Array<boolean>(F).fill(false);
  const farmPos = new Map((model.farmEffects?.farms ?? []).map((f, i) => [f, i]));
  const factors = layout.factors.map(() => new Float64Array(F));
  farms.forEach((farm, f) => {
    for (const name of Object.keys(farm.fixed))
      if (name !== landName && !layout.factors.includes(name)) throw new EstimationInputError(`farm ${farm.farm}: "${name}" is not a fixed factor of the model`);
    if (perHa) {
      const L = farm.fixed[landName!];
      if (L === undefined || !(Number.isFinite(L) && L > 0)) throw new EstimationInputError(`farm ${farm.farm}: land (${landName}) must be given and more than 0 ha`);
      landOf[f] = L;
    }
    layout.factors.forEach((name, kk) => {
      if (kk === trendIdx && farm.fixed[name] === undefined) {
        factors[kk]![f] = season - layout.trendOrigin! + 1;
        return;
      }
      const v = farm.fixed[name];
      if (v === undefined || !Number.isFinite(v)) throw new EstimationInputError(`farm ${farm.farm}: fixed factor "${name}" is missing or not a number`);
      factors[kk]![f] = perHa && kk !== trendIdx ? v / landOf[f]! : v;
    });
    known[f] = farmPos.has(farm.farm);
  });

  // Price-error scenarios.
  let K = 1;
  let errors: number[][] = [new Array<number>(n).fill(0)];
  const priceRisk = options.priceErrors !== undefined && Object.keys(options.priceErrors).length > 0;
  if (priceRisk) {
    const lens = Object.entries(options.priceErrors!).map(([name, v]) => {
      if (!itemIndex.has(name)) throw new EstimationInputError(`priceErrors: "${name}" is not an item of the model`);
      if (!Array.isArray(v) || !v.length) throw new EstimationInputError(`priceErrors: ${name} needs at least one past error`);
      v.forEach((e) => {
        if (!(Number.isFinite(e) && e > -1)) throw new EstimationInputError(`priceErrors: ${name} has ${e}, a relative error must be a number above −1`);
      });
      return v.length;
    });
    K = lens[0]!;
    if (lens.some((l) => l !== K)) throw new EstimationInputError('priceErrors: every item needs the same number of past seasons');
    errors = Array.from({ length: K }, (_, kk) => layout.items.map((it) => options.priceErrors![it.name]?.[kk] ?? 0));
  }

  // Regressor values per farm at the point prices and at every price-error scenario.
  const regressorsAt = (err: number[] | null): RegressorSet => {
    const data: ModelData = {
      T: F,
      prices: layout.items.map((_, i) => Float64Array.from(farmPrices, (p) => p[i]! * (1 + (err ? err[i]! : 0)))),
      netputs: layout.items.map(() => new Float64Array(F)),
      factors,
    };
    const { equations } = form.equations(layout, data);
    return { values: equations.map((eq) => eq.regressors.map((r) => Float64Array.from(r.values as ArrayLike<number>))) };
  };
  const { slots } = form.equations(layout, {
    T: 1,
    prices: layout.items.map((_, i) => Float64Array.of(common[i]!)),
    netputs: layout.items.map(() => new Float64Array(1)),
    factors: layout.factors.map(() => new Float64Array(1)),
  });
  const pointSet = regressorsAt(null);
  const sets = priceRisk ? errors.map((e) => regressorsAt(e)) : [pointSet];
  /** A regressor is common when it takes one value across farms in every scenario. */
  const isCommon = slots.map((sl, i) => sl.map((_, r) => sets.every((set) => set.values[i]![r]!.every((v) => v === set.values[i]![r]![0]))));

  // Shared draws (parameters, season shock, price-error scenario): forecast-draws.ts.
  // season parts at the plug-in scale; their few degrees of freedom enter through the
  // Welch–Satterthwaite t of each reported quantity (below), not as a scale mixture
  const withParams = options.parameterUncertainty ?? true;
  const shared = drawSharedParts(model, { draws: S, seed, parameterUncertainty: withParams, seasonScale: 'plug-in', ...(priceRisk ? { scenarios: K } : {}) });
  const { rng, theta: thetaDraws, lambda: lambdaDraws, scenario: scenarioOf } = shared;
  const violations = shared.curvatureViolations;
  const seasonFx = model.seasonEffects;
  const nu = seasonFx ? seasonFx.df : Infinity;

  // The farms' own normals: one pool, distinct cyclic offsets per farm.
  const P = Math.max(S, F);
  const pool = new Float64Array(P);
  rng.fillNormals(pool);
  const perm = Int32Array.from({ length: P }, (_, j) => j);
  for (let j = 0; j < Math.min(F, P - 1); j++) {
    const r = j + Math.floor(rng.uniform() * (P - j));
    const t = perm[j]!;
    perm[j] = perm[r]!;
    perm[r] = t;
  }

  const probs = quantileProbs(level);
  const welch = new WelchTable(Number.isFinite(nu) ? nu : 1e9, probs);
  const sign = layout.items.map((it) => (it.role === 'output' ? 1 : -1));
  const out = new Float64Array(S);
  const base = new Float64Array(S);
  const coop = new Float64Array(S);
  const counts = new Int32Array(HIST_BINS + 2);
  const pilot = new Float64Array(PILOT);
  const gridEta = new Float64Array(S);
  rng.fillNormals(gridEta);
  const gridBuf = new Float64Array(S);
  const farmQuantities = farms.map(() => ({}) as Record<string, ForecastQuantity>);
  const coopOut: Record<string, ForecastQuantity> = {};
  const fx = model.farmEffects;
  const scale = model.errorScale;
  for (let i = 0; i < n; i++) {
    const sl = slots[i]!;
    const common_i = isCommon[i]!;
    const varying = sl.map((_, r) => r).filter((r) => !common_i[r]);
    // shared part of every draw: common regressors × θ_s + λ_s
    for (let s = 0; s < S; s++) {
      const set = sets[scenarioOf[s]!]!.values[i]!;
      const o = s * k;
      let acc = lambdaDraws[s * n + i]!;
      for (let r = 0; r < sl.length; r++) if (common_i[r]) acc += set[r]![0]! * thetaDraws[o + sl[r]!]!;
      base[s] = acc;
    }
    coop.fill(0);
    let coopPoint = 0;
    const shift = Math.floor((i * P) / n);
    const muF = new Float64Array(F);
    const aF = new Float64Array(F);
    const resVarF = new Float64Array(F);
    const logLandF = new Float64Array(F);
    // uncertainty of the error-variance function σ̂_i²·(L/L̄)^δ̂_i (docs/forecasting.md §6, step 8)
    const logVarG = perHa && scale ? (scale.logVarianceVariance?.[i] ?? 0) : 0;
    const expVarG = perHa && scale ? (scale.exponentVariance?.[i] ?? 0) : 0;
    const pointF = new Float64Array(F);
    for (let f = 0; f < F; f++) {
      const pos = farmPos.get(farms[f]!.farm);
      let mu = 0;
      let varFarm = 0;
      if (perHa && fx) {
        if (pos !== undefined) {
          mu = fx.effects[i]![pos]!;
          varFarm = fx.variance[i]![pos]!;
        } else varFarm = fx.tau2[i]!;
      }
      const L = landOf[f]!;
      const resVar = perHa && scale ? scale.variance[i]! * Math.exp(scale.exponent[i]! * Math.log(L / scale.referenceLand)) : fit.sigma[i]![i]!;
      muF[f] = mu;
      aF[f] = Math.sqrt(varFarm + resVar);
      resVarF[f] = resVar;
      logLandF[f] = perHa && scale ? Math.log(L / scale.referenceLand) : 0;
      // point: θ̂, no shocks, the farm's own level, at the stated prices
      let yp = mu;
      const pv = pointSet.values[i]!;
      for (let r = 0; r < sl.length; r++) yp += pv[r]![f]! * fit.theta[sl[r]!]!;
      pointF[f] = Math.max(0, sign[i]! * L * yp);
      coopPoint += pointF[f]!;
    }
    const name = layout.items[i]!.name;
    // Welch–Satterthwaite degrees of freedom of each quantity (docs/forecasting.md §6): its
    // predictive variance V = V_known + V_season, where only the season part (the new season's
    // shock and the parameter error that past season shocks caused) rests on the few-season
    // estimate of Σ_λ with ν degrees of freedom; ν* = V² / (V_season² / ν).
    const Vf = withParams ? model.parameterCovariance.idiosyncratic : null;
    const Vsz = withParams && seasonFx ? model.parameterCovariance.season : null;
    const lamVar = seasonFx ? seasonFx.covariance[i]![i]! : 0;
    const quad = (V: number[][] | null, x: (r: number) => number): number => {
      if (!V) return 0;
      let acc = 0;
      for (let r = 0; r < sl.length; r++) {
        const xr = x(r);
        if (xr === 0) continue;
        const row = V[sl[r]!]!;
        for (let c = 0; c < sl.length; c++) acc += xr * row[sl[c]!]! * x(c);
      }
      return acc;
    };
    const pv = pointSet.values[i]!;
    const farmStretch = (f: number): Stretch => {
      if (!Number.isFinite(nu)) return NO_STRETCH;
      const xs = (r: number): number => pv[r]![f]!;
      const vs = lamVar + quad(Vsz, xs);
      const vk = aF[f]! ** 2 - resVarF[f]! + quad(Vf, xs);
      return welch.at(vk, vs, resVarF[f]!, logVarG + logLandF[f]! ** 2 * expVarG);
    };
    let coopStretch: Stretch = NO_STRETCH;
    if (Number.isFinite(nu)) {
      const X = sl.map((_, r) => {
        let acc = 0;
        for (let f = 0; f < F; f++) acc += landOf[f]! * pv[r]![f]!;
        return acc;
      });
      let Lsum = 0;
      let known = 0;
      let res = 0;
      let resX = 0;
      for (let f = 0; f < F; f++) {
        Lsum += landOf[f]!;
        const c = landOf[f]! ** 2 * resVarF[f]!;
        known += (landOf[f]! * aF[f]!) ** 2 - c;
        res += c;
        resX += c * logLandF[f]!;
      }
      // the farms' residual parts rest on the same σ̂_i², δ̂_i: Var(log Σ c_f) at their weighted log land
      const xc = res > 0 ? resX / res : 0;
      coopStretch = welch.at(known + quad(Vf, (r) => X[r]!), Lsum * Lsum * lamVar + quad(Vsz, (r) => X[r]!), res, logVarG + xc * xc * expVarG);
    }
    if (varying.length === 0) {
      // Every farm's per-hectare draw is base_s + μ_f + a_f·η: its quantiles are μ_f plus those of
      // base + a·η, found once on a grid of a (log-spaced, common random numbers, interpolated
      // in log a), and a farm's quantity is the monotone map L·max(0, ±·) of it. The per-farm loop
      // then only adds the farm to the co-op sum of every draw and keeps the farm's moments.
      const grid = quantileGrid(base, gridEta, aF, probs, gridBuf);
      for (let f = 0; f < F; f++) {
        const L = landOf[f]!;
        const off = (perm[f]! + shift) % P;
        const m = coopLoop(base, pool, coop, muF[f]!, aF[f]!, sign[i]! * L, off, P, S);
        const q = new Map<number, number>();
        for (const pr of probs) {
          // inputs are −netput: the quantity's p-quantile is the netput's (1 − p)-quantile
          const v = sign[i]! > 0 ? muF[f]! + grid.at(aF[f]!, pr) : -(muF[f]! + grid.at(aF[f]!, 1 - pr));
          q.set(pr, Math.max(0, L * v));
        }
        farmQuantities[f]![name] = shape(pointF[f]!, m[0]!, m[1]!, q, level, farmStretch(f));
      }
    } else {
      for (let f = 0; f < F; f++) {
        const off = (perm[f]! + shift) % P;
        const stats = farmKernel(out, coop, base, varying, sl, sets, scenarioOf, thetaDraws, k, i, f, muF[f]!, aF[f]!, sign[i]! * landOf[f]!, pool, off, P, pilot, counts);
        farmQuantities[f]![name] = summarise(out, pointF[f]!, probs, level, stats, counts, farmStretch(f));
      }
    }
    coopOut[layout.items[i]!.name] = summariseExact(coop, coopPoint, probs, level, coopStretch);
  }
  return {
    ...projectionHeader(model, season, { draws: S, seed, level }),
    prices: samePrices ? Object.fromEntries(layout.items.map((it, i) => [it.name, farmPrices[0]![i]!])) : null,
    farms: farms.map((farm, f) => ({ farm: farm.farm, known: known[f]!, land: perHa ? landOf[f]! : null, quantities: farmQuantities[f]! })),
    coop: coopOut,
    priceRisk,
    seasonShockDf: seasonFx ? nu : null,
    curvatureViolationShare: violations / S,
    caution: PROJECTION_CAUTION,
  };
}

/** How a quantity's band widens from the plug-in normal to its Welch–Satterthwaite t. */
export interface Stretch {
  /** t_ν*(p) / z(p) for a quantile probability p ≠ 0.5. */
  ratio: (p: number) => number;
  /** Applied to the draws' SD: √(ν* / (ν* − 2)) for ν* > 3, else the ratio at p = 0.95 (a t with ν ≤ 2 has no finite SD). */
  sdFactor: number;
}

export const NO_STRETCH: Stretch = { ratio: () => 1, sdFactor: 1 };

/**
 * Welch–Satterthwaite stretch factors for one projection: the season df ν and the quantile
 * probabilities are fixed, ν* ≥ ν varies by quantity. t_ν*(p)/z(p) is tabulated on a grid of
 * u = ν/ν* ∈ [0, 1] (smooth in 1/ν*) at 65 points and interpolated linearly: relative error below
 * 3e-5 of the stretch for ν = 2 (far below the Monte Carlo error of a band end).
 */
export class WelchTable {
  private readonly grid = 64;
  private readonly tables = new Map<number, Float64Array>();
  private readonly sd: Float64Array;
  private readonly nu: number;
  constructor(nu: number, probs: number[]) {
    this.nu = nu;
    for (const p of probs) {
      if (p === 0.5) continue;
      const z = normalQuantile(p);
      const t = new Float64Array(this.grid + 1);
      for (let g = 0; g <= this.grid; g++) {
        const u = g / this.grid;
        t[g] = u === 0 ? 1 : studentTQuantile(p, nu / u) / z;
      }
      this.tables.set(p, t);
    }
    const r95 = this.tables.get(0.95)!;
    this.sd = Float64Array.from({ length: this.grid + 1 }, (_, g) => {
      if (g === 0) return 1; // ν* = ∞: the normal
      const nuStar = nu / (g / this.grid);
      return nuStar > 3 ? Math.sqrt(nuStar / (nuStar - 2)) : r95[g]!;
    });
  }
  /**
   * The stretch for a quantity with known variance vk, season-based variance vs (ν degrees of
   * freedom) and a residual part vr whose estimate has Var(log v̂r) = logVar, i.e. ν_r = 2/logVar degrees
   * of freedom (vr and logVar default to 0: vr counted as known, or included in vk).
   */
  at(vk: number, vs: number, vr = 0, logVar = 0): Stretch {
    const wr = vr > 0 && logVar > 0 ? (vr * vr * logVar) / 2 : 0; // vr² / ν_r
    if (!(vs > 0) && !(wr > 0)) return NO_STRETCH;
    const V = vk + vs + vr;
    // ν* = V² / (vs²/ν + vr²/ν_r), so u = ν/ν* = (vs² + ν·vr²/ν_r) / V² (at most 1: ν* ≥ ν)
    const u = Math.min(1, (vs * vs + this.nu * wr) / (V * V));
    const x = u * this.grid;
    const g = Math.min(Math.floor(x), this.grid - 1);
    const h = x - g;
    const lerp = (t: Float64Array): number => t[g]! + h * (t[g + 1]! - t[g]!);
    return { ratio: (p) => lerp(this.tables.get(p)!), sdFactor: lerp(this.sd) };
  }
}

const HIST_BINS = 1024;
const PILOT = 64;

/**
 * The histogram bin of a positive draw: 1 to HIST_BINS across the pilot range [lo, lo + HIST_BINS/inv),
 * 0 below it and HIST_BINS + 1 above it (summarise() sorts the draws exactly when a quantile falls there).
 */
function binOf(v: number, lo: number, inv: number): number {
  const b = ((v - lo) * inv + 1) | 0;
  return b < 0 ? 0 : b > HIST_BINS + 1 ? HIST_BINS + 1 : b;
}

interface KernelStats {
  zeros: number;
  sum: number;
  sumSq: number;
  shift: number;
  lo: number;
  width: number;
  /** Writes the values into the output array when the kernel did not keep them. */
  fill: (() => void) | null;
}

/**
 * One farm and item, all draws: out[s] = max(0, scaleSign·(base[s] + varying part + μ + a·η)), the
 * co-op sums, the zero count, the moments and a histogram on a pilot range.
 */
function farmKernel(
  out: Float64Array,
  coop: Float64Array,
  base: Float64Array,
  varying: number[],
  sl: number[],
  sets: RegressorSet[],
  scenarioOf: Int32Array,
  thetaDraws: Float64Array,
  k: number,
  i: number,
  f: number,
  mu: number,
  a: number,
  scaleSign: number,
  pool: Float64Array,
  off: number,
  P: number,
  pilot: Float64Array,
  counts: Int32Array,
): KernelStats {
  const S = out.length;
  const value = (s: number): number => {
    let v = base[s]! + mu + a * pool[(s + off) % P]!;
    if (varying.length) {
      const set = sets[scenarioOf[s]!]!.values[i]!;
      const o = s * k;
      for (const r of varying) v += set[r]![f]! * thetaDraws[o + sl[r]!]!;
    }
    v *= scaleSign;
    return v > 0 ? v : 0;
  };
  // pilot range from evenly spaced draws
  for (let j = 0; j < PILOT; j++) pilot[j] = value(Math.floor((j * S) / PILOT));
  pilot.sort();
  const pLo = pilot[1]!;
  const pHi = pilot[PILOT - 2]!;
  const spread = Math.max(pHi - pLo, 1e-9 * (Math.abs(pHi) + Math.abs(pLo)), 1e-300);
  const lo = Math.max(0, pLo - 0.75 * spread);
  const hi = pHi + 0.75 * spread;
  const width = (hi - lo) / HIST_BINS;
  const inv = 1 / width;
  counts.fill(0);
  const shift = pilot[PILOT >> 1]!;
  if (varying.length === 0) {
    // the usual case (no regressor differs between farms): a tight loop that keeps no copy of the
    // values; summarise() recomputes them in the rare case it needs an exact sort
    const acc = fastLoop(base, pool, coop, counts, mu, a, scaleSign, off, P, S, lo, inv, shift);
    return { zeros: acc[0]!, sum: acc[1]!, sumSq: acc[2]!, shift, lo, width, fill: () => { for (let s = 0; s < S; s++) out[s] = value(s); } };
  }
  let zeros = 0;
  let s1 = 0;
  let s2 = 0;
  for (let s = 0; s < S; s++) {
    const v = value(s);
    out[s] = v;
    coop[s]! += v;
    const d = v - shift;
    s1 += d;
    s2 += d * d;
    if (v === 0) zeros++;
    else counts[binOf(v, lo, inv)]!++;
  }
  return { zeros, sum: s1, sumSq: s2, shift, lo, width, fill: null };
}

const fastAcc = new Float64Array(3);

/** v_s = max(0, scaleSign·(base_s + μ + a·η_(s+off) mod P)) for every draw: co-op sums, moments, histogram. */
function fastLoop(
  base: Float64Array,
  pool: Float64Array,
  coop: Float64Array,
  counts: Int32Array,
  mu: number,
  a: number,
  scaleSign: number,
  off: number,
  P: number,
  S: number,
  lo: number,
  inv: number,
  shift: number,
): Float64Array {
  let zeros = 0;
  let s1 = 0;
  let s2 = 0;
  const c0 = scaleSign * mu;
  const ca = scaleSign * a;
  // two segments so the pool index needs no modulo
  let s = 0;
  for (let seg = 0; seg < 2; seg++) {
    const end = seg === 0 ? Math.min(S, P - off) : S;
    let idx = seg === 0 ? off : 0;
    for (; s < end; s++, idx++) {
      let v = scaleSign * base[s]! + c0 + ca * pool[idx]!;
      if (!(v > 0)) v = 0;
      coop[s]! += v;
      const d = v - shift;
      s1 += d;
      s2 += d * d;
      if (v === 0) zeros++;
      else counts[binOf(v, lo, inv)]!++;
    }
  }
  fastAcc[0] = zeros;
  fastAcc[1] = s1;
  fastAcc[2] = s2;
  return fastAcc;
}

const GRID = 48;
const coopAcc = new Float64Array(2);

/** Adds one farm's quantity to the co-op sum of every draw; returns the farm's mean and sd. */
function coopLoop(base: Float64Array, pool: Float64Array, coop: Float64Array, mu: number, a: number, scaleSign: number, off: number, P: number, S: number): Float64Array {
  const c0 = scaleSign * mu;
  const ca = scaleSign * a;
  let s1 = 0;
  let s2 = 0;
  let s = 0;
  for (let seg = 0; seg < 2; seg++) {
    const end = seg === 0 ? Math.min(S, P - off) : S;
    let idx = seg === 0 ? off : 0;
    for (; s < end; s++, idx++) {
      let v = scaleSign * base[s]! + c0 + ca * pool[idx]!;
      if (!(v > 0)) v = 0;
      coop[s]! += v;
      s1 += v;
      s2 += v * v;
    }
  }
  const mean = s1 / S;
  coopAcc[0] = mean;
  coopAcc[1] = S > 1 ? Math.sqrt(Math.max(s2 - S * mean * mean, 0) / (S - 1)) : 0;
  return coopAcc;
}

interface QuantileGrid {
  /** p-quantile of base + a·η (type 7), interpolated in log a between grid points. */
  at(a: number, p: number): number;
}

/** Quantiles of base_s + a·η_s at every p and 1 − p, on a log-spaced grid of a over the farms' range. */
function quantileGrid(base: Float64Array, eta: Float64Array, aF: Float64Array, probs: number[], buf: Float64Array): QuantileGrid {
  const S = base.length;
  let aMin = Infinity;
  let aMax = 0;
  for (const v of aF) {
    if (v < aMin) aMin = v;
    if (v > aMax) aMax = v;
  }
  const ps = [...new Set([...probs, ...probs.map((p) => 1 - p)])];
  const G = aMax > aMin * (1 + 1e-12) ? GRID : 1;
  const la = Math.log(Math.max(aMin, 1e-300));
  const step = G > 1 ? (Math.log(aMax) - la) / (G - 1) : 0;
  const table = new Map<number, Float64Array>(ps.map((p) => [p, new Float64Array(G)]));
  for (let g = 0; g < G; g++) {
    const a = G > 1 ? Math.exp(la + g * step) : aMin;
    for (let s = 0; s < S; s++) buf[s] = base[s]! + a * eta[s]!;
    buf.sort();
    for (const p of ps) table.get(p)![g] = typeQuantile(buf, p);
  }
  return {
    at(a: number, p: number): number {
      const row = table.get(p) ?? table.get(ps.reduce((best, x) => (Math.abs(x - p) < Math.abs(best - p) ? x : best)))!;
      if (G === 1) return row[0]!;
      const x = Math.min(Math.max((Math.log(a) - la) / step, 0), G - 1);
      const g = Math.min(Math.floor(x), G - 2);
      const t = x - g;
      return row[g]! + t * (row[g + 1]! - row[g]!);
    },
  };
}

function quantileProbs(level: number): number[] {
  const set = new Set([(1 - level) / 2, 0.5, (1 + level) / 2, 0.05, 0.95]);
  return [...set].sort((a, b) => a - b);
}

/** Quantiles from the histogram (interpolated within the bin), exact for the zero mass. */
function summarise(x: Float64Array, point: number, probs: number[], level: number, st: KernelStats, counts: Int32Array, stretch: Stretch): ForecastQuantity {
  const N = x.length;
  const mean = st.shift + st.sum / N;
  const sd = N > 1 ? Math.sqrt(Math.max(st.sumSq - (st.sum * st.sum) / N, 0) / (N - 1)) : 0;
  const q = new Map<number, number>();
  let exact: Float64Array | null = null;
  const under = st.zeros + counts[0]!;
  const overStart = N - counts[HIST_BINS + 1]!;
  // probs ascend, so one walk over the bins serves them all
  let b = 1;
  let cum = under;
  for (const p of probs) {
    const target = p * N; // rank (continuous) of the quantile
    if (target < st.zeros) {
      q.set(p, 0);
      continue;
    }
    if (target < under || (counts[HIST_BINS + 1]! > 0 && target >= overStart)) {
      if (!exact) {
        st.fill?.();
        exact = Float64Array.from(x).sort();
      }
      q.set(p, typeQuantile(exact, p));
      continue;
    }
    for (; b <= HIST_BINS; b++) {
      const c = counts[b]!;
      if (cum + c > target) break;
      cum += c;
    }
    const c = counts[b]!;
    const frac = c > 0 ? (target - cum) / c : 0;
    q.set(p, st.lo + (b - 1 + frac) * st.width);
  }
  return shape(point, mean, sd, q, level, stretch);
}

function summariseExact(x: Float64Array, point: number, probs: number[], level: number, stretch: Stretch): ForecastQuantity {
  const N = x.length;
  let m = 0;
  for (let s = 0; s < N; s++) m += x[s]!;
  m /= N;
  let v = 0;
  for (let s = 0; s < N; s++) v += (x[s]! - m) ** 2;
  const sorted = Float64Array.from(x).sort();
  const q = new Map(probs.map((p) => [p, typeQuantile(sorted, p)]));
  return shape(point, m, N > 1 ? Math.sqrt(v / (N - 1)) : 0, q, level, stretch);
}

/** R's type 7 quantile of a sorted sample. */
function typeQuantile(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

/** The summary, with the band widened to hold the point when simulation noise leaves it outside. */
function shape(point: number, mean: number, sd: number, q0: Map<number, number>, level: number, stretch: Stretch): ForecastQuantity {
  // the t of the quantity: deviations from the median stretched by t_ν*(p)/z(p); on the quantity
  // scale and floored at 0 this equals stretching the netput before max(0, ·), as the map is monotone
  const med = q0.get(0.5)!;
  const q = new Map([...q0].map(([p, v]) => [p, p === 0.5 ? v : Math.max(0, med + (v - med) * stretch.ratio(p))]));
  sd *= stretch.sdFactor;
  const lower = Math.max(0, Math.min(q.get((1 - level) / 2)!, point));
  const upper = Math.max(q.get((1 + level) / 2)!, point, lower);
  return {
    point,
    mean,
    sd,
    median: Math.max(0, q.get(0.5)!),
    p5: Math.max(0, q.get(0.05)!),
    p95: Math.max(0, q.get(0.95)!),
    lower,
    upper,
  };
}
