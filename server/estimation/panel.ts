/**
 * The forecasting model of a farm panel (docs/forecasting.md §4–§5).
 *
 * 'per-hectare' (the default when land and farms are recorded): with constant returns to the
 * quasi-fixed land, π(p, L, z) = L·π(p, 1, z/L), so every netput per hectare is a function of prices,
 * the other fixed factors per hectare and the trend alone (Lau 1978). The per-hectare netput system
 * of the chosen form (NQ or GL, symmetry imposed, homogeneity by normalisation) is estimated with
 *   y_ift / L_ft = x_ift'β + μ_if + λ_it + ε_ift,   Var(ε_ift) = σ_i² (L_ft / L̄)^δ_i,
 * where μ_if is farm f's own level in equation i, shrunk toward the population by empirical Bayes
 * (w = τ²/(τ² + σ²/T_f); Efron & Morris 1975), λ_it a season effect shared by every farm (its
 * covariance across items estimated from the season means of the residuals; Baltagi 1980 for the
 * two-way error components), and δ_i the slope of log squared residuals on log land.
 * Estimation alternates (backfitting, as in Henderson's mixed-model equations): iterated SUR with
 * the symmetry restrictions on the farm-adjusted, size-weighted data, then the farm and season
 * effects and the variance scaling from its residuals, until β and the effects settle. Convexity is
 * imposed (curvature.ts) when the estimate violates it.
 *
 * Parameter covariance: a sandwich P(B_farm + B_season)P with P the restricted GLS covariance,
 * B_farm clustered by farm and B_season the model-based part of the season shocks; the projection
 * draws the season part with the same Student t scale as the new season's shock.
 *
 * 'pooled': the profit function of fit.ts in levels (land an ordinary fixed factor), bands from
 * parameter and residual uncertainty only; kept for comparison.
 */
import type { CurvatureReport } from '../../shared/estimation-types.js';
import type { ErrorScale, FarmEffects, ForecastModel, ForecastSpec, SeasonEffects } from '../../shared/forecast-types.js';
import { checkConvexity, imposeConvexity } from './curvature.js';
import type { NetputDataset } from './dataset.js';
import { EstimationInputError } from './errors.js';
import { equationFits, fitChecks, fitProfitFunction, likelihoodFigures, prepareModel, symmetryRestrictions, systemLogLikelihood, type FitResult } from './fit.js';
import { formOf } from './forms.js';
import { covarianceToCorrelation, dot, inverse, jacobiEigenvalues, mean, symmetricEigen, type Mat } from './linalg.js';
import type { FormName } from './model.js';
import { crossProducts, dotFour, fitSur, type CrossProductCache, type SurEquationInput, type SystemCrossProducts } from './sur.js';

export type { ForecastSpec } from '../../shared/forecast-types.js';

export interface ForecastModelOptions {
  /** Default: 'per-hectare' when the data have farms and a land column, else 'pooled'. */
  spec?: ForecastSpec;
  form?: 'nq' | 'gl' | FormName;
  numeraire?: string;
  trend?: boolean;
  /** Name of the land factor (default: the fixed factor called land or land_ha, any case). */
  land?: string;
  /** As in fitProfitFunction (default 'auto': impose convexity when the estimate violates it). */
  curvature?: 'auto' | 'impose' | 'check';
  /** Per-hectare only: farm effects (default true), season effects (true), size-scaled errors (true). */
  farmEffects?: boolean;
  seasonEffects?: boolean;
  sizeScaledErrors?: boolean;
  /**
   * Per-hectare only: weight the season means by the season-shock variance in the SUR step (the
   * random-effects transformation of Fuller & Battese 1974 for the season dimension: each
   * observation less θ_it × its season's weighted mean, θ_it = 1 − √(σ_i²/(σ_i² + W_t σ_λi²))).
   * Default true (docs/forecasting.md §5–§6); false gives the plain SUR step, every farm-season
   * weighted alike, kept for comparison.
   */
  seasonGls?: boolean;
}

export type { ErrorScale, FarmEffects, ForecastModel, SeasonEffects } from '../../shared/forecast-types.js';

const LAND_NAMES = ['land', 'land_ha'];

/** Index of the land factor, or −1. */
export function landFactorIndex(ds: NetputDataset, name?: string): number {
  if (name !== undefined) {
    const k = ds.fixedFactors.indexOf(name);
    if (k < 0) throw new EstimationInputError(`land factor "${name}" is not a fixed factor of the data (fixed:${name} is missing)`);
    return k;
  }
  return ds.fixedFactors.findIndex((f) => LAND_NAMES.includes(f.toLowerCase()));
}

/**
 * Fit the forecasting model. Pure and deterministic.
 * @throws EstimationInputError for unusable data or options
 */
/** v / land, element by element (a plain loop: long panels). */
function perHectare(v: ArrayLike<number>, land: ArrayLike<number>): number[] {
  const out = new Array<number>(v.length);
  for (let o = 0; o < v.length; o++) out[o] = v[o]! / land[o]!;
  return out;
}

export function fitForecastModel(ds: NetputDataset, options: ForecastModelOptions = {}): ForecastModel {
  const landIdx = landFactorIndex(ds, options.land);
  const spec: ForecastSpec = options.spec ?? (landIdx >= 0 && ds.farms ? 'per-hectare' : 'pooled');
  const seasons = seasonList(ds);
  if (spec === 'pooled') {
    const fit = fitProfitFunction(ds, {
      ...(options.form ? { form: options.form } : {}),
      ...(options.numeraire !== undefined ? { numeraire: options.numeraire } : {}),
      trend: options.trend ?? false,
      curvature: options.curvature ?? 'auto',
    });
    const k = fit.theta.length;
    return {
      spec,
      specification: `${formWords(fit.layout.form)} profit function in levels, one technology and one error variance for every farm${options.trend ? ', with a trend' : ''}`,
      fit,
      landFactor: landIdx >= 0 ? ds.fixedFactors[landIdx]! : null,
      parameterCovariance: { idiosyncratic: fit.covariance, season: Array.from({ length: k }, () => new Array<number>(k).fill(0)) },
      farmEffects: null,
      seasonEffects: null,
      errorScale: null,
      seasons,
      outerIterations: 0,
    };
  }
  if (landIdx < 0) throw new EstimationInputError('the per-hectare model needs land: add a fixed:land column (hectares) or use the pooled model');
  if (!ds.farms) throw new EstimationInputError('the per-hectare model needs a farm column (one row per farm and season)');
  return fitPerHectare(ds, landIdx, options, seasons);
}

function formWords(f: FormName): string {
  return f === 'normalized-quadratic' ? 'Normalized quadratic' : 'Generalized Leontief';
}

function seasonList(ds: NetputDataset): { labels: string[]; years: number[] } {
  const byYear = new Map<number, string>();
  ds.seasonYears.forEach((y, o) => {
    if (!byYear.has(y)) byYear.set(y, ds.seasons[o]!);
  });
  const years = [...byYear.keys()].sort((a, b) => a - b);
  return { years, labels: years.map((y) => byYear.get(y)!) };
}

function fitPerHectare(ds: NetputDataset, landIdx: number, options: ForecastModelOptions, seasons: { labels: string[]; years: number[] }): ForecastModel {
  const N = ds.rows.length;
  const landName = ds.fixedFactors[landIdx]!;
  const land = Float64Array.from(ds.fixed[landIdx]!);
  for (let o = 0; o < N; o++)
    if (!(land[o]! > 0))
      throw new EstimationInputError(`row ${ds.rows[o]}, column fixed:${landName}: land must be more than 0 ha for the per-hectare model, got ${land[o]}`, {
        row: ds.rows[o]!,
        column: `fixed:${landName}`,
      });
  // Per-hectare dataset: quantities and other fixed factors divided by land; land itself leaves.
  const dsHa: NetputDataset = {
    ...ds,
    fixedFactors: ds.fixedFactors.filter((_, k) => k !== landIdx),
    quantities: ds.quantities.map((q) => perHectare(q, land)),
    fixed: ds.fixed.filter((_, k) => k !== landIdx).map((z) => perHectare(z, land)),
  };
  const prepared = prepareModel(dsHa, {
    ...(options.form ? { form: options.form } : {}),
    ...(options.numeraire !== undefined ? { numeraire: options.numeraire } : {}),
    trend: options.trend ?? false,
  });
  const { layout, data, equations, slots } = prepared;
  const form = formOf(layout.form);
  const n = layout.items.length;
  const k = layout.parameterNames.length;
  const useFarm = options.farmEffects ?? true;
  const useSeason = options.seasonEffects ?? true;
  const useScale = options.sizeScaledErrors ?? true;
  const useGls = (options.seasonGls ?? true) && useSeason;
  const warnings: string[] = [];

  // Farm and season indices.
  const farmNames: string[] = [];
  const farmOf = new Int32Array(N);
  const farmIndex = new Map<string, number>();
  ds.farms!.forEach((f, o) => {
    let id = farmIndex.get(f);
    if (id === undefined) {
      id = farmNames.length;
      farmIndex.set(f, id);
      farmNames.push(f);
    }
    farmOf[o] = id;
  });
  const F = farmNames.length;
  const S = seasons.years.length;
  const seasonIndex = new Map(seasons.years.map((y, s) => [y, s]));
  const seasonOf = new Int32Array(N);
  for (let o = 0; o < N; o++) seasonOf[o] = seasonIndex.get(ds.seasonYears[o]!)!;
  const runs = seasonRuns(seasonOf);
  const Tf = new Int32Array(F);
  for (let o = 0; o < N; o++) Tf[farmOf[o]!]!++;
  const lastLand = new Float64Array(F);
  const lastYear = new Int32Array(F).fill(-1);
  for (let o = 0; o < N; o++) {
    const f = farmOf[o]!;
    if (ds.seasonYears[o]! >= lastYear[f]!) {
      lastYear[f] = ds.seasonYears[o]!;
      lastLand[f] = land[o]!;
    }
  }
  let logSum = 0;
  for (let o = 0; o < N; o++) logSum += Math.log(land[o]!);
  const Lref = Math.exp(logSum / N);
  const logL = mapF(land, (v) => Math.log(v / Lref));
  let sxx = 0;
  for (let o = 0; o < N; o++) sxx += logL[o]! ** 2;
  const landVaries = sxx / N > 1e-6;

  const { rep, R } = symmetryRestrictions(equations, slots, k);
  const y = equations.map((e) => e.y as Float64Array);

  // State.
  const delta = new Float64Array(n); // per-item variance exponents
  let deltaW = 0; // common exponent used for the SUR weights
  const mu = Array.from({ length: n }, () => new Float64Array(F));
  const muVar = Array.from({ length: n }, () => new Float64Array(F));
  const lambda = Array.from({ length: n }, () => new Float64Array(S));
  const tau2 = new Array<number>(n).fill(0);
  const sigma2 = new Array<number>(n).fill(0);
  // sampling variances of log σ̂_i² and of δ̂_i (the bands' residual degrees of freedom, forecasting.md §6)
  const logSigma2Var = new Array<number>(n).fill(0);
  const deltaVar = new Array<number>(n).fill(0);
  const resid = Array.from({ length: n }, () => new Float64Array(N));
  let theta = new Array<number>(k).fill(0);
  let sur: ReturnType<typeof fitSur> | null = null;
  let w = new Float64Array(N).fill(1);
  let sqw = new Float64Array(N).fill(1);
  let weightedCols = new Map<ArrayLike<number>, Float64Array>();
  let gramCache: CrossProductCache = new WeakMap();
  // Season GLS: keep[i][s] = 1 − θ_is (1 everywhere: no transformation), and per-equation caches of
  // the transformed regressors.
  const keep = Array.from({ length: n }, () => new Float64Array(S).fill(1));
  let eqCols: Map<ArrayLike<number>, Float64Array>[] = equations.map(() => new Map());
  const glsActive = (): boolean => keep.some((kk) => kk.some((v) => v !== 1));
  /** sqw_o (v_o − θ_is v̄_s), v̄_s the w-weighted mean of season s. */
  // season sums of the common weights (set with the weights)
  let seasonWeight: Float64Array | null = null;
  const seasonWeights = (): Float64Array => {
    if (!seasonWeight) {
      seasonWeight = new Float64Array(S);
      addSeasonSums(seasonWeight, runs, w);
    }
    return seasonWeight;
  };
  /** sqw_o (v_o − θ_is v̄_s); `seasonSums` (Σ_{o∈s} w_o v_o) when the caller has them. */
  const quasiDemean = (v: ArrayLike<number>, i: number, seasonSums?: Float64Array, out: Float64Array = new Float64Array(N)): Float64Array => {
    let num = seasonSums;
    if (!num) {
      num = new Float64Array(S);
      addSeasonDot(num, runs, w, v);
    }
    const den = seasonWeights();
    const th = keep[i]!;
    const sub = new Float64Array(S);
    for (let s = 0; s < S; s++) sub[s] = den[s]! > 0 ? ((1 - th[s]!) * num[s]!) / den[s]! : 0;
    for (let r = 0; r < runs.count; r++) {
      const sb = sub[runs.season[r]!]!;
      for (let o = runs.start[r]!; o < runs.end[r]!; o++) out[o] = sqw[o]! * (v[o]! - sb);
    }
    return out;
  };

  /**
   * Within-season statistics of the raw regressors under the common weights (set with the weights):
   * per season s, the weight W_s, the weighted sums Σ w x_u and the centred cross products
   * C_s[u][v] = Σ_{o∈s} w (x_u − x̄_us)(x_v − x̄_vs). With them the cross product of two
   * quasi-demeaned columns sqw (x_u − θ_is x̄_us) and sqw (x_v − θ_js x̄_vs) is
   * Σ_s C_s[u][v] + (1 − θ_is)(1 − θ_js) (Σ w x_u)(Σ w x_v) / W_s, S terms instead of N.
   * A regressor that does not vary within any season (a season's prices, a trend) has C_s = 0
   * with every other, so only the pairs of regressors that vary within seasons cost a pass.
   */
  let withinSeason: { cols: Map<ArrayLike<number>, number>; raw: Float64Array[]; sums: Float64Array[] } | null = null;
  // the regressors as Float64Arrays (copies of plain arrays, kept for the fit): one element type in the passes
  const asFloat64 = new Map<ArrayLike<number>, Float64Array>();
  const float64Of = (v: ArrayLike<number>): Float64Array => {
    if (v instanceof Float64Array) return v;
    let c = asFloat64.get(v);
    if (!c) asFloat64.set(v, (c = Float64Array.from(v)));
    return c;
  };
  const withinSeasonStats = () => {
    if (withinSeason) return withinSeason;
    const cols = new Map<ArrayLike<number>, number>();
    const raw: Float64Array[] = [];
    for (const eq of equations)
      for (const r of eq.regressors)
        if (!cols.has(r.values)) {
          cols.set(r.values, raw.length);
          raw.push(float64Of(r.values));
        }
    const sums = raw.map((v) => {
      const t = new Float64Array(S);
      addSeasonDot(t, runs, w, v);
      return t;
    });
    withinSeason = { cols, raw, sums };
    return withinSeason;
  };
  let centredProducts: (Float64Array | null)[][] | null = null;
  const withinSeasonCentred = (): (Float64Array | null)[][] => {
    if (centredProducts) return centredProducts;
    const { raw, sums } = withinSeasonStats();
    const W = seasonWeights();
    // season means x̄_us, and which regressors vary within a season (x − x̄_s is formed where it is
    // used, the same rounded difference each time)
    const means = raw.map((_, u) => sums[u]!.map((t, s) => (W[s]! > 0 ? t / W[s]! : 0)));
    const varies = raw.map((v, u) => {
      const m = means[u]!;
      for (let r = 0; r < runs.count; r++) {
        const ms = m[runs.season[r]!]!;
        const am = Math.abs(ms);
        for (let o = runs.start[r]!; o < runs.end[r]!; o++) if (Math.abs(v[o]! - ms) > 1e-12 * (Math.abs(v[o]!) + am)) return true;
      }
      return false;
    });
    const U = raw.length;
    const centred = Array.from({ length: U }, () => new Array<Float64Array | null>(U).fill(null));
    const wdu = new Float64Array(N);
    for (let u = 0; u < U; u++) {
      if (!varies[u]) continue;
      // w_o (x_uo − x̄_us)
      const xu = raw[u]!;
      const mx = means[u]!;
      for (let r = 0; r < runs.count; r++) {
        const ms = mx[runs.season[r]!]!;
        for (let o = runs.start[r]!; o < runs.end[r]!; o++) wdu[o] = w[o]! * (xu[o]! - ms);
      }
      const partners: number[] = [];
      for (let v = u; v < U; v++) if (varies[v]) partners.push(v);
      const products = partners.map(() => new Float64Array(S));
      addSeasonCentredDots(
        products,
        runs,
        wdu,
        partners.map((v) => raw[v]!),
        partners.map((v) => means[v]!),
      );
      partners.forEach((v, j) => {
        centred[u]![v] = products[j]!;
        centred[v]![u] = products[j]!;
      });
    }
    centredProducts = centred;
    return centred;
  };
  /**
   * Cross product of regressor u quasi-demeaned with keep kA and regressor v with keep kB (the
   * within-season statistics' formula above).
   */
  const glsPairProduct = (u: number, kA: Float64Array, v: number, kB: Float64Array): number => {
    const { sums } = withinSeasonStats();
    const c = withinSeasonCentred()[u]![v];
    const W = seasonWeights();
    const sa = sums[u]!;
    const sb = sums[v]!;
    let x = 0;
    for (let s = 0; s < S; s++) x += (c ? c[s]! : 0) + (W[s]! > 0 ? (kA[s]! * kB[s]! * sa[s]! * sb[s]!) / W[s]! : 0);
    return x;
  };
  /** Puts the cross products of every pair of quasi-demeaned regressors into the SUR's cache. */
  const cacheGlsCrossProducts = (eqs: SurEquationInput[]): void => {
    const { cols } = withinSeasonStats();
    const entries = eqs.flatMap((eq, i) =>
      eq.regressors.map((r, a) => ({ col: r.values as Float64Array, u: cols.get(equations[i]!.regressors[a]!.values)!, keep: keep[i]! })),
    );
    for (let p = 0; p < entries.length; p++) {
      const A = entries[p]!;
      let inner = gramCache.get(A.col);
      if (!inner) gramCache.set(A.col, (inner = new WeakMap()));
      for (let q = 0; q < entries.length; q++) {
        const B = entries[q]!;
        if (inner.has(B.col)) continue;
        inner.set(B.col, glsPairProduct(A.u, A.keep, B.u, B.keep));
      }
    }
  };
  /**
   * The quasi-demeaned dependent variables y*_i = sqw (d − θ_is d̄_s), d = y − μ_i (the season sums
   * in the same pass), and sqw·y*_i beside them; into `into` when given (columns no cache holds).
   */
  const glsDependent = (into?: { yStar: Float64Array[]; weighted: Float64Array[] }): { yStar: Float64Array[]; weighted: Float64Array[] } => {
    const yStar: Float64Array[] = [];
    const weighted: Float64Array[] = [];
    const d = dBuffer;
    for (let i = 0; i < n; i++) {
      const yi = y[i]!;
      const mi = mu[i]!;
      const num = new Float64Array(S);
      for (let r = 0; r < runs.count; r++) {
        const s = runs.season[r]!;
        let acc = num[s]!;
        for (let o = runs.start[r]!; o < runs.end[r]!; o++) {
          const x = yi[o]! - mi[farmOf[o]!]!;
          d[o] = x;
          acc += w[o]! * x;
        }
        num[s] = acc;
      }
      const ys = quasiDemean(d, i, num, into?.yStar[i]);
      const yw = into?.weighted[i] ?? new Float64Array(N);
      for (let o = 0; o < N; o++) yw[o] = sqw[o]! * ys[o]!;
      yStar.push(ys);
      weighted.push(yw);
    }
    return { yStar, weighted };
  };
  const dBuffer = new Float64Array(N);
  /** The SUR step's equations with their columns built (the season-GLS regressors quasi-demeaned). */
  const weightedEquations = (): SurEquationInput[] => {
    if (!glsActive()) return plainWeightedEquations();
    let built = false;
    const { yStar } = glsDependent();
    const eqs = equations.map((eq, i) => ({
      name: eq.name,
      y: yStar[i]!,
      regressors: eq.regressors.map((r) => {
        let c = eqCols[i]!.get(r.values);
        if (!c) {
          const { cols, sums } = withinSeasonStats();
          c = quasiDemean(r.values, i, sums[cols.get(r.values)!]);
          eqCols[i]!.set(r.values, c);
          built = true;
        }
        return { name: r.name, values: c };
      }),
    }));
    if (built) cacheGlsCrossProducts(eqs);
    return eqs;
  };
  // y*, sqw·y* of the season-GLS step (fitSur keeps neither: cross products given, no residuals)
  const glsBuffers = { yStar: equations.map(() => new Float64Array(N)), weighted: equations.map(() => new Float64Array(N)) };
  // X*_i'X*_j blocks of the season-GLS system (kept while the weights and θ hold)
  let glsRegressorBlocks: Mat[][] | null = null;
  /**
   * The season-GLS SUR step without building its regressors: X*'X* from the within-season
   * statistics; X*_i'y*_j = Σ_o x_u sqw y*_j − Σ_s θ_is x̄_us Σ_{o∈s} sqw y*_j, a pass over each
   * raw regressor (shared by the equations) instead of one over each equation's quasi-demeaned copy;
   * y*'y* directly.
   */
  const glsSystem = (): { eqs: SurEquationInput[]; crossProducts: SystemCrossProducts } => {
    const { cols, raw, sums } = withinSeasonStats();
    const W = seasonWeights();
    const units = equations.map((eq) => eq.regressors.map((r) => cols.get(r.values)!));
    if (!glsRegressorBlocks) {
      // each pair computed once, with the earlier (equation, regressor) first, and mirrored
      const flat = units.flatMap((us, i) => us.map((u, a) => ({ i, a, u })));
      const blocks = equations.map((ei) => equations.map((ej) => ei.regressors.map(() => new Array<number>(ej.regressors.length).fill(0))));
      for (let p = 0; p < flat.length; p++)
        for (let q = p; q < flat.length; q++) {
          const A = flat[p]!;
          const B = flat[q]!;
          const x = glsPairProduct(A.u, keep[A.i]!, B.u, keep[B.i]!);
          blocks[A.i]![B.i]![A.a]![B.a] = x;
          blocks[B.i]![A.i]![B.a]![A.a] = x;
        }
      glsRegressorBlocks = blocks;
    }
    const { yStar, weighted } = glsDependent(glsBuffers);
    // Σ_o x_u sqw y*_j for every raw regressor u and equation j; Σ_{o∈s} sqw y*_j
    const zy = raw.map((x) => dotEach(x, weighted));
    const season = weighted.map((v) => {
      const t = new Float64Array(S);
      addSeasonSums(t, runs, v);
      return t;
    });
    const mean = sums.map((t) => t.map((v, s) => (W[s]! > 0 ? v / W[s]! : 0)));
    const xy = units.map((us, i) =>
      units.map((_, j) =>
        us.map((u) => {
          let x = zy[u]![j]!;
          const th = keep[i]!;
          const m = mean[u]!;
          const t = season[j]!;
          for (let s = 0; s < S; s++) x -= (1 - th[s]!) * m[s]! * t[s]!;
          return x;
        }),
      ),
    );
    const yy = crossProducts(yStar, N);
    const eqs = equations.map((eq, i) => ({ name: eq.name, y: yStar[i]!, regressors: eq.regressors.map((r) => ({ name: r.name, values: NOT_READ })) }));
    return { eqs, crossProducts: { xx: glsRegressorBlocks, xy, yy } };
  };
  const plainWeightedEquations = (): SurEquationInput[] =>
      equations.map((eq, i) => {
      const yi = y[i]!;
      const mi = mu[i]!;
      const yw = new Float64Array(N);
      for (let o = 0; o < N; o++) yw[o] = sqw[o]! * (yi[o]! - mi[farmOf[o]!]!);
      return {
        name: eq.name,
        y: yw,
        regressors: eq.regressors.map((r) => {
          // unit weights (δ = 0: every (L/L̄)^0 is exactly 1) leave the columns as they are
          if (deltaW === 0) return { name: r.name, values: r.values };
          let c = weightedCols.get(r.values);
          if (!c) {
            c = new Float64Array(N);
            const v = r.values;
            for (let o = 0; o < N; o++) c[o] = sqw[o]! * v[o]!;
            weightedCols.set(r.values, c);
          }
          return { name: r.name, values: c };
        }),
      };
    });
  const setWeights = (d: number): void => {
    deltaW = d;
    w = mapF(logL, (x) => Math.exp(-d * x));
    sqw = mapF(w, Math.sqrt);
    seasonWeight = null;
    withinSeason = null;
    centredProducts = null;
    weightedCols = new Map();
    eqCols = equations.map(() => new Map());
    gramCache = new WeakMap();
    glsRegressorBlocks = null;
  };
  const residualsAt = (th: number[]): void => {
    equations.forEach((eq, i) => {
      const e = resid[i]!;
      e.set(y[i]!);
      // up to four regressors a pass, each subtracted in turn (the same sums as one at a time)
      const regs = eq.regressors;
      let r = 0;
      for (; r + 4 <= regs.length; r += 4) {
        const b0 = th[slots[i]![r]!]!;
        const b1 = th[slots[i]![r + 1]!]!;
        const b2 = th[slots[i]![r + 2]!]!;
        const b3 = th[slots[i]![r + 3]!]!;
        const v0 = float64Of(regs[r]!.values);
        const v1 = float64Of(regs[r + 1]!.values);
        const v2 = float64Of(regs[r + 2]!.values);
        const v3 = float64Of(regs[r + 3]!.values);
        subtractFour(e, b0, v0, b1, v1, b2, v2, b3, v3);
      }
      for (; r < regs.length; r++) subtractOne(e, th[slots[i]![r]!]!, float64Of(regs[r]!.values));
    });
  };

  /** Farm and season effects, variances and exponents from the current raw residuals. */
  // per-item weights (L/L̄)^−δ_i, recomputed when δ_i has moved by more than 1e-3
  const itemW = Array.from({ length: n }, () => new Float64Array(N).fill(1));
  const itemWDelta = new Float64Array(n);
  /** Item i's weights at the current δ_i when it has moved by more than 1e-3 since they were set. */
  const refreshItemWeights = (i: number): void => {
    if (Math.abs(delta[i]! - itemWDelta[i]!) > 1e-3) {
      itemW[i] = mapF(logL, (x) => Math.exp(-delta[i]! * x));
      itemWDelta[i] = delta[i]!;
      itemWSums[i] = null;
    }
  };
  const e2Buffer = new Float64Array(N);
  // Σ log land, Σ (log land)² and the count over the observations the size exponents use
  let logLandMoments: { sx: number; sxx: number; count: number } | null = null;
  const logLandSums = (): { sx: number; sxx: number; count: number } => {
    if (!logLandMoments) {
      let sx = 0;
      let sxx = 0;
      let count = 0;
      for (let o = 0; o < N; o++) {
        if (useFarm && Tf[farmOf[o]!]! < 2) continue;
        sx += logL[o]!;
        sxx += logL[o]! * logL[o]!;
        count++;
      }
      logLandMoments = { sx, sxx, count };
    }
    return logLandMoments;
  };
  // season and farm sums of each item's weights, kept while its weights hold
  const itemWSums: ({ season: Float64Array; farm: Float64Array } | null)[] = equations.map(() => null);
  const itemWeightSums = (i: number): { season: Float64Array; farm: Float64Array } => {
    let c = itemWSums[i];
    if (!c) {
      const wi = itemW[i]!;
      c = { season: new Float64Array(S), farm: new Float64Array(F) };
      addSeasonSums(c.season, runs, wi);
      for (let o = 0; o < N; o++) c.farm[farmOf[o]!]! += wi[o]!;
      itemWSums[i] = c;
    }
    return c;
  };
  // squared within-farm residuals scaled to T_f − 1 degrees of freedom
  const dofScale = new Float64Array(F);
  for (let f = 0; f < F; f++) dofScale[f] = useFarm ? (Tf[f]! > 1 ? Tf[f]! / (Tf[f]! - 1) : 0) : 1;
  /** `estimateDelta`: re-estimate the size exponents (every round until the weights settle, and at the end). */
  const sumsOut = new Float64Array(2);
  const updateEffects = (estimateDelta = true): void => {
    for (let i = 0; i < n; i++) {
      const r = resid[i]!;
      refreshItemWeights(i);
      const wi = itemW[i]!;
      const wSums = itemWeightSums(i);
      const m = mu[i]!;
      const lam = lambda[i]!;
      // season effects: weighted season means of r − μ
      if (useSeason) {
        const num = new Float64Array(S);
        const den = wSums.season;
        seasonSumsLessFarm(num, runs, wi, r, m, farmOf);
        let lm = 0;
        for (let s = 0; s < S; s++) {
          lam[s] = den[s]! > 0 ? num[s]! / den[s]! : 0;
          lm += lam[s]!;
        }
        // the intercept carries the average season; effects are deviations from it
        lm /= S;
        for (let s = 0; s < S; s++) lam[s]! -= lm;
      }
      // farm means of r − λ (weighted) and the within-farm residuals
      const fm = new Float64Array(F);
      const fw = wSums.farm;
      farmSumsLessSeason(fm, runs, wi, r, lam, farmOf);
      for (let f = 0; f < F; f++) fm[f] = fw[f]! > 0 ? fm[f]! / fw[f]! : 0;
      // σ_i² at the reference land from the within-farm residuals (degrees of freedom T_f − 1)
      let dof = 0;
      const e2 = e2Buffer;
      const ss = withinFarmSquares(e2, runs, wi, r, lam, useFarm ? fm : null, farmOf, dofScale);
      for (let f = 0; f < F; f++) dof += useFarm ? Tf[f]! - 1 : Tf[f]!;
      dof -= useSeason ? S : 0;
      const s2 = ss / Math.max(dof, 1);
      sigma2[i] = s2 > 0 ? s2 : 1e-300;
      // a scaled χ² with `dof` degrees of freedom: Var(log σ̂²) ≈ 2/dof
      logSigma2Var[i] = 2 / Math.max(dof, 1);
      // τ_i² by moments: spread of farm means less their sampling variance
      if (useFarm) {
        // effects are deviations from the population level, which the intercept carries
        let mbar = 0;
        let wsum = 0;
        for (let f = 0; f < F; f++) {
          mbar += fw[f]! * fm[f]!;
          wsum += fw[f]!;
        }
        mbar /= wsum;
        for (let f = 0; f < F; f++) fm[f]! -= mbar;
        let between = 0;
        let noise = 0;
        for (let f = 0; f < F; f++) {
          between += fm[f]! ** 2;
          noise += sigma2[i]! / fw[f]!;
        }
        const t2 = F > 1 ? (between - ((F - 1) / F) * noise) / (F - 1) : 0;
        tau2[i] = Math.max(t2, 1e-6 * sigma2[i]!);
        for (let f = 0; f < F; f++) {
          const nv = sigma2[i]! / fw[f]!;
          const B = tau2[i]! / (tau2[i]! + nv);
          m[f] = B * fm[f]!;
          muVar[i]![f] = B * nv;
        }
      }
      // δ_i: slope of log squared within-farm residuals on log land
      if (useScale && landVaries && estimateDelta) {
        const { sx, sxx: sxx2, count: cnt } = logLandSums();
        const floor = 1e-12 * sigma2[i]!;
        logSquareSums(sumsOut, e2, floor, logL, useFarm ? Tf : null, farmOf);
        const sy = sumsOut[0]!;
        const sxy = sumsOut[1]!;
        const vx = sxx2 - (sx * sx) / Math.max(cnt, 1);
        const d = cnt > 2 && vx > 1e-9 * cnt ? (sxy - (sx * sy) / cnt) / vx : 0;
        delta[i] = Math.min(Math.max(d, -2), 1);
        // Var(δ̂) = s²/Σ(x − x̄)², s² the residual variance of the log squares about the line
        if (cnt > 2 && vx > 1e-9 * cnt) {
          const xbar = sx / cnt;
          const ybar = sy / cnt;
          const rss = logSquareRss(e2, floor, logL, useFarm ? Tf : null, farmOf, ybar, d, xbar);
          deltaVar[i] = rss / (cnt - 2) / vx;
        } else deltaVar[i] = 0;
      }
    }
  };

  const offsets: number[] = [];
  {
    let acc = 0;
    for (const eq of equations) {
      offsets.push(acc);
      acc += eq.regressors.length;
    }
  }
  // Σ_{o∈s} (L_o/L̄)^−δ_i per season, kept for the δ_i it was computed at
  const itemSeasonW: { delta: number; sums: Float64Array }[] = equations.map(() => ({ delta: NaN, sums: new Float64Array(S) }));
  const itemSeasonWeights = (i: number): Float64Array => {
    const c = itemSeasonW[i]!;
    // the weights the next round will use anyway
    if (c.delta !== delta[i]) refreshItemWeights(i);
    if (c.delta !== delta[i] && itemWDelta[i] === delta[i]) {
      // the item's weights are at this δ_i: the same sums
      itemSeasonW[i] = { delta: delta[i]!, sums: itemWeightSums(i).season };
    } else if (c.delta !== delta[i]) {
      const wi = new Float64Array(S);
      const di = delta[i]!;
      for (let q = 0; q < runs.count; q++) {
        const s = runs.season[q]!;
        let acc = wi[s]!;
        for (let o = runs.start[q]!; o < runs.end[q]!; o++) acc += Math.exp(-di * logL[o]!);
        wi[s] = acc;
      }
      itemSeasonW[i] = { delta: delta[i]!, sums: wi };
    }
    return itemSeasonW[i]!.sums;
  };
  /** The season-shock covariance from the current fit (seasonShockCovariance) and its inputs. */
  const seasonShock = () => {
    const sigmaInv = inverse(sur!.sigmaUsed);
    // g[s][a] = Σ_{o∈s} w_o x_oa (raw regressors, common weights), from the within-season sums
    const { cols, sums } = withinSeasonStats();
    const seasonSums = equations.map((eq) => {
      const g = Array.from({ length: S }, () => new Float64Array(eq.regressors.length));
      eq.regressors.forEach((reg, a) => {
        const t = sums[cols.get(reg.values)!]!;
        for (let s = 0; s < S; s++) g[s]![a] = t[s]!;
      });
      return g;
    });
    const seasonW = Float64Array.from(seasonWeights());
    let est: { covariance: Mat; df: number } | null = null;
    if (useSeason) {
      const noise = sigma2.map((s2, i) => {
        const wi = itemSeasonWeights(i);
        return Array.from(wi, (v) => s2 / v);
      });
      est = seasonShockCovariance(lambda, sur!.covariance, sigmaInv, seasonSums, seasonW, offsets, noise, keep);
    }
    return { sigmaInv, seasonSums, seasonW, est };
  };
  /** Season GLS: θ_is from the current σ_i² and season-shock variances; caches reset. */
  const updateGls = (): void => {
    const { seasonW, est } = seasonShock();
    for (let i = 0; i < n; i++) {
      const sl = est!.covariance[i]![i]!;
      for (let s = 0; s < S; s++) keep[i]![s] = Math.sqrt(sigma2[i]! / (sigma2[i]! + seasonW[s]! * sl));
    }
    eqCols = equations.map(() => new Map());
    gramCache = new WeakMap();
    glsRegressorBlocks = null;
  };

  const maxOuter = 30;
  let outer = 0;
  let converged = false;
  let surIterations = 0;
  const solveTheta = (last: boolean): number[] => {
    const system = glsActive() ? glsSystem() : { eqs: plainWeightedEquations(), crossProducts: undefined };
    try {
      sur = fitSur(system.eqs, {
        method: 'SUR',
        maxIterations: last ? 200 : 1,
        tolerance: 1e-7,
        residualCovariance: 'noDfCor',
        crossProductCache: gramCache,
        ...(system.crossProducts ? { crossProducts: system.crossProducts } : {}),
        residualsFromCrossProducts: true,
        keepResiduals: false,
        ...(R.length ? { restrictions: { matrix: R } } : {}),
      });
    } catch (e) {
      if (e instanceof Error && /singular/.test(e.message))
        throw new EstimationInputError('the per-hectare netput system cannot be estimated: its normal equations are singular (check for items whose quantities or prices never vary)');
      throw e;
    }
    surIterations = sur.iterations;
    return rep.map((pos) => sur!.coefficients[pos]!);
  };
  for (outer = 1; outer <= maxOuter; outer++) {
    const prev = theta;
    const prevDelta = Array.from(delta);
    theta = solveTheta(false);
    residualsAt(theta);
    updateEffects(outer <= 3);
    let num = 0;
    let den = 0;
    for (let j = 0; j < k; j++) {
      num += (theta[j]! - prev[j]!) ** 2;
      den += prev[j]! ** 2;
    }
    const dd = prevDelta.reduce((a, v, i) => Math.max(a, Math.abs(v - delta[i]!)), 0);
    const newW = useScale ? delta.reduce((a, v) => a + v, 0) / n : 0;
    // the weights only make the estimate efficient: they settle after three rounds, so that later
    // rounds reuse the regressors' cross products
    if (outer <= 3 && Math.abs(newW - deltaW) > 1e-4) setWeights(newW);
    // the season-GLS weights likewise settle after four rounds (θ rests on the fit's absorption of
    // the season shocks, so it is re-estimated with the fit)
    if (useGls && outer <= 4) updateGls();
    if (outer > 1 && Math.sqrt(num / Math.max(den, 1e-300)) < 1e-6 && dd < 1e-4) {
      converged = true;
      break;
    }
  }
  if (!converged) warnings.push(`the farm and season effects did not settle in ${maxOuter} rounds`);
  outer = Math.min(outer, maxOuter);
  // Final iterated SUR at the settled effects and weights.
  theta = solveTheta(true);
  residualsAt(theta);
  updateEffects();

  // Convexity.
  const means = { prices: data.prices.map((v) => mean(v)), fixed: data.factors.map((v) => mean(v)) };
  const block = form.curvatureBlock(layout, means.prices);
  const unrestricted = checkConvexity(block.toMatrix(theta));
  const mode = options.curvature ?? 'auto';
  const impose = mode === 'impose' || (mode === 'auto' && !unrestricted.convex);
  let curvatureExtra: Pick<CurvatureReport, 'binding' | 'iterations' | 'converged' | 'optimality'> = {};
  let imposedCov: Mat | null = null;
  if (impose) {
    for (let round = 0; round < 4; round++) {
      const eqW = weightedEquations();
      const imposed = imposeConvexity({
        equations: eqW,
        slots,
        parameterCount: k,
        theta0: theta,
        sigma0: sur!.sigmaUsed,
        block,
        maxIterations: 500,
        tolerance: 1e-8,
      });
      theta = imposed.theta;
      imposedCov = imposed.covariance;
      curvatureExtra = { binding: imposed.binding, iterations: imposed.iterations, converged: imposed.converged, optimality: imposed.optimality };
      residualsAt(theta);
      updateEffects();
      if (!imposed.converged) warnings.push('the convexity-constrained fit did not converge');
    }
    if (curvatureExtra.binding) warnings.push('convexity binds: the constrained price Hessian is singular (estimates on the boundary)');
    if (!block.global) warnings.push('for the generalized Leontief form convexity is imposed at the sample-mean prices only');
  }

  // Season-shock covariance and its t degrees of freedom (the season-level residual df).
  const { sigmaInv, seasonSums, seasonW, est: finalShock } = seasonShock();
  let seasonCov: Mat = zerosMat(n);
  let df = Infinity;
  const P = sur!.covariance;
  const K = P.length;
  if (useSeason) {
    seasonCov = finalShock!.covariance;
    df = Math.max(2, finalShock!.df);
  }

  // Parameter covariance: P (B_farm + B_season) P, mapped to θ.
  const Bf = zerosMat(K);
  {
    const h = Array.from({ length: F }, () => new Float64Array(K));
    const eo = new Float64Array(n);
    const uo = new Float64Array(n);
    const vo = new Float64Array(n);
    const gls = glsActive();
    const regValues = equations.map((eq) => eq.regressors.map((r) => float64Of(r.values)));
    // 1 − k_is k_js by season
    const cross = Array.from({ length: S }, (_, s) => keep.map((ki) => keep.map((kj) => 1 - ki[s]! * kj[s]!)));
    addFarmScores(h, { farmOf, seasonOf, sqw, resid, lambda, mu, sigmaInv, gls, cross, regValues, offsets, seasonW, seasonSums }, eo, uo, vo);
    for (let f = 0; f < F; f++) {
      const hf = h[f]!;
      for (let a = 0; a < K; a++) {
        const ha = hf[a]!;
        if (ha === 0) continue;
        const row = Bf[a]!;
        for (let b = 0; b < K; b++) row[b]! += ha * hf[b]!;
      }
    }
  }
  const Bs = zerosMat(K);
  if (useSeason) {
    // a season-s shock λ_s enters X*'Σ⁻¹y* as block i: k_is g_is [Σ⁻¹ D_s λ_s]_i, D_s = diag(k_·s)
    // (k = 1 − θ; 1 without the season GLS)
    for (let s = 0; s < S; s++) {
      const D = keep.map((kk) => kk[s]!);
      const DSD = seasonCov.map((row, i) => row.map((v, j) => D[i]! * v * D[j]!));
      const M = matMulSmall(matMulSmall(sigmaInv, DSD), sigmaInv);
      for (let i = 0; i < n; i++)
        for (let j = 0; j < n; j++) {
          const mij = M[i]![j]! * D[i]! * D[j]!;
          if (mij === 0) continue;
          const gi = seasonSums[i]![s]!;
          const gj = seasonSums[j]![s]!;
          for (let a = 0; a < gi.length; a++) for (let b = 0; b < gj.length; b++) Bs[offsets[i]! + a]![offsets[j]! + b]! += gi[a]! * gj[b]! * mij;
        }
    }
  }
  const toTheta = (V: Mat): Mat => rep.map((a) => rep.map((b) => V[a]![b]!));
  const PBfP = toTheta(matMulSmall(matMulSmall(P, Bf), P));
  const PBsP = toTheta(matMulSmall(matMulSmall(P, Bs), P));
  const idio = imposedCov ?? PBfP;
  const covariance = idio.map((row, a) => row.map((v, b) => v + PBsP[a]![b]!));

  // Equation statistics (per hectare, raw residuals less the effects) and the FitResult.
  const standardErrors = covariance.map((row, a) => Math.sqrt(Math.max(row[a]!, 0)));
  const eqFits = equationFits(
    layout,
    equations,
    slots,
    theta,
    standardErrors,
    (i) => {
      let ssr = 0;
      for (let o = 0; o < N; o++) {
        const e = resid[i]![o]! - lambda[i]![seasonOf[o]!]! - mu[i]![farmOf[o]!]!;
        ssr += e * e;
      }
      return ssr;
    },
    N,
  );
  const sigmaEps = residualCovarianceOf(resid, lambda, mu, seasonOf, farmOf, sigma2);
  // Gaussian log-likelihood of the weighted SUR (an approximation that ignores the effects' variance).
  let logDet = 0;
  const ch = jacobiEigenvalues(sur!.sigmaUsed);
  for (const v of ch) logDet += Math.log(Math.max(v, 1e-300));
  let logW = 0;
  for (let o = 0; o < N; o++) logW += Math.log(w[o]!);
  const logLikelihood = systemLogLikelihood(N, n, logDet) + (n / 2) * logW;
  const checks = fitChecks({
    layout,
    form,
    block,
    theta,
    prices: data.prices,
    observations: N,
    fitted: (i, o) => y[i]![o]! - resid[i]![o]!,
    unrestricted,
    imposed: impose,
    extra: curvatureExtra,
  });
  const fit: FitResult = {
    layout,
    observations: N,
    theta,
    covariance,
    standardErrors,
    sigma: sigmaEps,
    residualCorrelation: covarianceToCorrelation(sigmaEps),
    equations: eqFits,
    ...likelihoodFigures(logLikelihood, k, N),
    iterations: surIterations,
    converged,
    seasonYears: { first: seasons.years[0]!, last: seasons.years[S - 1]! },
    means,
    referencePrices: means.prices,
    ...checks,
    warnings,
  };
  const parts = [
    `${formWords(layout.form)} profit function per hectare of land (constant returns to land)`,
    useFarm ? "each farm's own level shrunk toward all farms" : null,
    useSeason ? `a season shock shared by all farms (t with ${df.toFixed(1)} df)` : null,
    useScale ? 'error variance scaled by farm size' : null,
    options.trend ? 'a trend' : null,
  ].filter((x): x is string => x !== null);
  return {
    spec: 'per-hectare',
    specification: parts.join(', '),
    fit,
    landFactor: landName,
    parameterCovariance: { idiosyncratic: idio, season: PBsP },
    farmEffects: useFarm
      ? {
          farms: farmNames,
          effects: mu.map((m) => Array.from(m)),
          variance: muVar.map((m) => Array.from(m)),
          tau2,
          seasons: Array.from(Tf),
          lastLand: Array.from(lastLand),
        }
      : {
          farms: farmNames,
          effects: mu.map(() => new Array<number>(F).fill(0)),
          variance: mu.map(() => new Array<number>(F).fill(0)),
          tau2: new Array<number>(n).fill(0),
          seasons: Array.from(Tf),
          lastLand: Array.from(lastLand),
        },
    seasonEffects: useSeason ? { seasons: seasons.labels, years: seasons.years, effects: lambda.map((l) => Array.from(l)), covariance: seasonCov, df } : null,
    errorScale: { referenceLand: Lref, exponent: Array.from(delta), variance: sigma2.slice(), logVarianceVariance: logSigma2Var.slice(), exponentVariance: useScale && landVaries ? deltaVar.slice() : deltaVar.map(() => 0) },
    seasons,
    outerIterations: outer,
  };
}

/**
 * Covariance across items of the season shocks, and the degrees of freedom of its estimate, from the
 * season means of the residuals λ̂ (centred). The fitted coefficients absorb part of every season
 * shock (prices move with the seasons), so λ̂ = M λ with M = C(I − Q): Q maps a shock in (item a,
 * season s) through the restricted GLS estimator P·X'Σ⁻¹ into the fitted season means
 * (Q_(i,t),(a,s) = x̄_it'·[P g_(a,s)]_i, g the weighted regressor sums of season s) and C centres over
 * seasons. Then E[Σ_t λ̂_it²] ≈ σ_λi²·c_i + noise_i with c_i = Σ_t Σ_s M_(i,t),(i,s)² (the leakage of
 * other items' shocks is left out: small, and unstable when estimated); the correlations across
 * items are those of the λ̂.
 * The degrees of freedom are the average c_i (seasons less what the fit absorbs).
 */
function seasonShockCovariance(
  lambda: Float64Array[],
  P: Mat,
  sigmaInv: Mat,
  seasonSums: Float64Array[][],
  seasonW: Float64Array,
  offsets: number[],
  noise: number[][],
  keep?: Float64Array[],
): { covariance: Mat; df: number } {
  const n = lambda.length;
  const S = lambda[0]!.length;
  const K = P.length;
  const NS = n * S;
  // M = C (I − Q), rows and columns indexed (item, season) → item·S + season
  const Q = Array.from({ length: NS }, () => new Float64Array(NS));
  const g = new Float64Array(K);
  for (let a = 0; a < n; a++)
    for (let s = 0; s < S; s++) {
      g.fill(0);
      for (let j = 0; j < n; j++) {
        const c = sigmaInv[j]![a]!;
        if (c === 0) continue;
        const gs = seasonSums[j]![s]!;
        // with the season GLS the shock is scaled by k_as in y* and k_js in X*'s season sums
        const kf = keep ? keep[a]![s]! * keep[j]![s]! : 1;
        for (let b = 0; b < gs.length; b++) g[offsets[j]! + b] = gs[b]! * c * kf;
      }
      const db = new Float64Array(K);
      for (let r = 0; r < K; r++) {
        let acc = 0;
        const row = P[r]!;
        for (let c = 0; c < K; c++) acc += row[c]! * g[c]!;
        db[r] = acc;
      }
      const col = a * S + s;
      for (let i = 0; i < n; i++)
        for (let t = 0; t < S; t++) {
          const gt = seasonSums[i]![t]!;
          let acc = 0;
          for (let b = 0; b < gt.length; b++) acc += (gt[b]! / seasonW[t]!) * db[offsets[i]! + b]!;
          Q[i * S + t]![col] = acc;
        }
    }
  const M = Array.from({ length: NS }, (_, r) => Float64Array.from(Q[r]!, (q, c) => (r === c ? 1 : 0) - q));
  // centre over seasons within each item
  for (let i = 0; i < n; i++)
    for (let c = 0; c < NS; c++) {
      let m = 0;
      for (let t = 0; t < S; t++) m += M[i * S + t]![c]!;
      m /= S;
      for (let t = 0; t < S; t++) M[i * S + t]![c]! -= m;
    }
  const coef = (i: number, a: number): number => {
    let acc = 0;
    for (let t = 0; t < S; t++) {
      const ri = M[i * S + t]!;
      for (let s = 0; s < S; s++) acc += ri[a * S + s]! ** 2;
    }
    return acc;
  };
  // Each item's variance from its own term E[Σ_t λ̂_it²] ≈ σ_λi²·c_ii + noise (the leakage of other
  // items' shocks through the cross-equation restrictions is small and, estimated, unstable);
  // correlations across items from the λ̂ themselves.
  const own = lambda.map((_, i) => coef(i, i));
  // The season means of the farm residuals (noise) enter λ̂ exactly as the shocks do — the fit absorbs
  // them through the same M — so their expected share of Σ_t λ̂_it² is Σ_t Σ_(a,s) M_(i,t),(a,s)²·noise_as,
  // not Σ_t noise_it·(1 − 1/S) (that would take the absorbed part of the noise off twice and bias
  // σ̂_λ² down, to 0 for an item whose prices move only from season to season).
  const noiseShare = lambda.map((_, i) => {
    let acc = 0;
    for (let t = 0; t < S; t++) {
      const ri = M[i * S + t]!;
      for (let a = 0; a < n; a++) for (let s = 0; s < S; s++) acc += ri[a * S + s]! ** 2 * noise[a]![s]!;
    }
    return acc;
  });
  const sd = lambda.map((l, i) => {
    let ss = -noiseShare[i]!;
    for (let t = 0; t < S; t++) ss += l[t]! ** 2;
    return Math.sqrt(Math.max(ss / Math.max(own[i]!, 1e-9), 0));
  });
  const gram = lambda.map((a) => lambda.map((b) => dot(a, b)));
  const cov = clipPsd(gram.map((row, i) => row.map((v, j) => (i === j ? sd[i]! ** 2 : (v / Math.sqrt(gram[i]![i]! * gram[j]![j]! || 1)) * sd[i]! * sd[j]!))));
  // Degrees of freedom (Satterthwaite 1946): σ̂_i² = (λ̂_i'λ̂_i − noise)/c_i is a quadratic form
  // x'M_i'M_i x / c_i in the stacked shocks and season-mean noise x ~ N(0, Ω), Ω = Σ_λ ⊗ I + diag(noise),
  // so Var(σ̂_i²) = 2 tr(B_i²)/c_i² with B_i = M_i Ω M_i' (S × S). Matching a scaled χ²_ν,
  // ν_i = (σ_i² c_i)² / tr(B_i²). When M_i'M_i is a projection of rank c_i and there is no leakage
  // or noise this is c_i; when the fit absorbs a part of every direction (eigenvalues between 0 and 1,
  // the usual case) the estimate rests on more directions than c_i and ν_i > c_i.
  const dfs = lambda.map((_, i) => {
    const MO = Array.from({ length: S }, () => new Float64Array(NS));
    for (let t = 0; t < S; t++) {
      const mi = M[i * S + t]!;
      const out = MO[t]!;
      for (let a = 0; a < n; a++)
        for (let s = 0; s < S; s++) {
          let acc = noise[a]![s]! * mi[a * S + s]!;
          for (let b = 0; b < n; b++) acc += cov[a]![b]! * mi[b * S + s]!;
          out[a * S + s] = acc;
        }
    }
    let tr2 = 0;
    for (let t = 0; t < S; t++)
      for (let u = 0; u < S; u++) {
        const b = dot(MO[t]!, M[i * S + u]!);
        tr2 += b * b;
      }
    const e = cov[i]![i]! * own[i]!;
    return tr2 > 0 && e > 0 ? (e * e) / tr2 : own[i]!;
  });
  const df = dfs.reduce((a, v) => a + v, 0) / n;
  return { covariance: cov, df };
}

/** Nearest positive semidefinite matrix (negative eigenvalues set to zero). */
function clipPsd(a: Mat): Mat {
  const { values, vectors } = symmetricEigen(a);
  const n = a.length;
  const out = zerosMat(n);
  for (let l = 0; l < n; l++) {
    const v = Math.max(values[l]!, 0);
    if (v === 0) continue;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i]![j]! += vectors[i]![l]! * v * vectors[j]![l]!;
  }
  return out;
}

function residualCovarianceOf(resid: Float64Array[], lambda: Float64Array[], mu: Float64Array[], seasonOf: Int32Array, farmOf: Int32Array, sigma2: number[]): Mat {
  const n = resid.length;
  const N = resid[0]!.length;
  const e = resid.map((r, i) => {
    const out = new Float64Array(N);
    const lam = lambda[i]!;
    const m = mu[i]!;
    for (let o = 0; o < N; o++) out[o] = r[o]! - lam[seasonOf[o]!]! - m[farmOf[o]!]!;
    return out;
  });
  const g = e.map((a) => e.map((b) => dot(a, b)));
  return g.map((row, i) => row.map((v, j) => (v / Math.sqrt(g[i]![i]! * g[j]![j]! || 1)) * Math.sqrt(sigma2[i]! * sigma2[j]!) * (N > 0 ? 1 : 0)));
}

/** Element-wise map into a new Float64Array (a plain loop: Float64Array.from with a map function is slow). */
function mapF(a: Float64Array, f: (v: number) => number): Float64Array<ArrayBuffer> {
  const out = new Float64Array(a.length);
  for (let o = 0; o < a.length; o++) out[o] = f(a[o]!);
  return out;
}

function zerosMat(n: number): Mat {
  return Array.from({ length: n }, () => new Array<number>(n).fill(0));
}

function matMulSmall(a: Mat, b: Mat): Mat {
  const n = a.length;
  const m = b[0]?.length ?? 0;
  const kk = b.length;
  const out = Array.from({ length: n }, () => new Array<number>(m).fill(0));
  for (let i = 0; i < n; i++) {
    const ai = a[i]!;
    const oi = out[i]!;
    for (let l = 0; l < kk; l++) {
      const v = ai[l]!;
      if (v === 0) continue;
      const bl = b[l]!;
      for (let j = 0; j < m; j++) oi[j]! += v * bl[j]!;
    }
  }
  return out;
}


/** Stands for a regressor column that fitSur does not read (its cross products are given). */
const NOT_READ = new Float64Array(0);

/** Σ_o a_o b_o for each b in bs, four at a time over a. */
function dotEach(a: Float64Array, bs: Float64Array[]): Float64Array {
  const out = new Float64Array(bs.length);
  const four = new Float64Array(4);
  let j = 0;
  for (; j + 4 <= bs.length; j += 4) {
    dotFour(four, a, bs[j]!, bs[j + 1]!, bs[j + 2]!, bs[j + 3]!, a.length);
    out.set(four, j);
  }
  for (; j < bs.length; j++) out[j] = dot(a, bs[j]!);
  return out;
}

/** Maximal runs of consecutive observations in one season (one a season when the rows are sorted by season). */
/** num_s += Σ_{o∈s} w_o (r_o − m_farm(o)) (a module-level loop: optimised once for every fit). */
function seasonSumsLessFarm(num: Float64Array, runs: SeasonRuns, w: Float64Array, r: Float64Array, m: Float64Array, farmOf: Int32Array): void {
  for (let q = 0; q < runs.count; q++) {
    const s = runs.season[q]!;
    let an = num[s]!;
    for (let o = runs.start[q]!; o < runs.end[q]!; o++) an += w[o]! * (r[o]! - m[farmOf[o]!]!);
    num[s] = an;
  }
}

/** fm_f += Σ_{o∈f} w_o (r_o − λ_season(o)). */
function farmSumsLessSeason(fm: Float64Array, runs: SeasonRuns, w: Float64Array, r: Float64Array, lam: Float64Array, farmOf: Int32Array): void {
  for (let q = 0; q < runs.count; q++) {
    const ls = lam[runs.season[q]!]!;
    for (let o = runs.start[q]!; o < runs.end[q]!; o++) fm[farmOf[o]!]! += w[o]! * (r[o]! - ls);
  }
}

/** e2_o = e_o² · dofScale_f with e = r − λ_s − fm_f (fm null: no farm term); returns Σ w e². */
function withinFarmSquares(e2: Float64Array, runs: SeasonRuns, w: Float64Array, r: Float64Array, lam: Float64Array, fm: Float64Array | null, farmOf: Int32Array, dofScale: Float64Array): number {
  let ss = 0;
  for (let q = 0; q < runs.count; q++) {
    const ls = lam[runs.season[q]!]!;
    for (let o = runs.start[q]!; o < runs.end[q]!; o++) {
      const f = farmOf[o]!;
      const e = r[o]! - ls - (fm ? fm[f]! : 0);
      e2[o] = e * e * dofScale[f]!;
      ss += w[o]! * e * e;
    }
  }
  return ss;
}

/** out = [Σ log(e2 + floor), Σ x log(e2 + floor)] over the observations of farms with two or more seasons (Tf null: all). */
function logSquareSums(out: Float64Array, e2: Float64Array, floor: number, x: Float64Array, Tf: Int32Array | null, farmOf: Int32Array): void {
  let sy = 0;
  let sxy = 0;
  for (let o = 0; o < e2.length; o++) {
    if (Tf && Tf[farmOf[o]!]! < 2) continue;
    const ly = Math.log(e2[o]! + floor);
    sy += ly;
    sxy += x[o]! * ly;
  }
  out[0] = sy;
  out[1] = sxy;
}

/** Residual sum of squares of log(e2 + floor) about the line ybar + d (x − xbar), same observations. */
function logSquareRss(e2: Float64Array, floor: number, x: Float64Array, Tf: Int32Array | null, farmOf: Int32Array, ybar: number, d: number, xbar: number): number {
  let rss = 0;
  for (let o = 0; o < e2.length; o++) {
    if (Tf && Tf[farmOf[o]!]! < 2) continue;
    const ry = Math.log(e2[o]! + floor) - ybar - d * (x[o]! - xbar);
    rss += ry * ry;
  }
  return rss;
}

/** e −= b0 v0 + … + b3 v3, subtracted in that order. */
function subtractFour(e: Float64Array, b0: number, v0: Float64Array, b1: number, v1: Float64Array, b2: number, v2: Float64Array, b3: number, v3: Float64Array): void {
  for (let o = 0; o < e.length; o++) e[o] = e[o]! - b0 * v0[o]! - b1 * v1[o]! - b2 * v2[o]! - b3 * v3[o]!;
}

function subtractOne(e: Float64Array, b: number, v: Float64Array): void {
  for (let o = 0; o < e.length; o++) e[o]! -= b * v[o]!;
}

/** h_f += the farm's score terms X*' Σ⁻¹ ε* observation by observation (module level: optimised once). */
function addFarmScores(
  h: Float64Array[],
  d: {
    farmOf: Int32Array;
    seasonOf: Int32Array;
    sqw: Float64Array;
    resid: Float64Array[];
    lambda: Float64Array[];
    mu: Float64Array[];
    sigmaInv: Mat;
    gls: boolean;
    cross: number[][][];
    regValues: Float64Array[][];
    offsets: number[];
    seasonW: Float64Array;
    seasonSums: Float64Array[][];
  },
  eo: Float64Array,
  uo: Float64Array,
  vo: Float64Array,
): void {
  const { farmOf, seasonOf, sqw, resid, lambda, mu, sigmaInv, gls, cross, regValues, offsets, seasonW, seasonSums } = d;
  const N = farmOf.length;
  const n = eo.length;
  for (let o = 0; o < N; o++) {
    const f = farmOf[o]!;
    const s = seasonOf[o]!;
    for (let i = 0; i < n; i++) eo[i] = sqw[o]! * (resid[i]![o]! - lambda[i]![s]! - mu[i]![f]!);
    for (let i = 0; i < n; i++) {
      let acc = 0;
      let accV = 0;
      for (let j = 0; j < n; j++) {
        acc += sigmaInv[i]![j]! * eo[j]!;
        // season GLS: Σ_o x*_io ε*_jo = Σ_o w_o ε_jo (x_io − (1 − k_is k_js) x̄_is)
        if (gls) accV += sigmaInv[i]![j]! * eo[j]! * cross[s]![i]![j]!;
      }
      uo[i] = acc;
      vo[i] = accV;
    }
    const hf = h[f]!;
    for (let i = 0; i < n; i++) {
      const regs = regValues[i]!;
      const base = offsets[i]!;
      const u = uo[i]! * sqw[o]!;
      for (let a = 0; a < regs.length; a++) hf[base + a]! += regs[a]![o]! * u;
      if (gls && vo[i] !== 0) {
        const v = (vo[i]! * sqw[o]!) / seasonW[s]!;
        const gs = seasonSums[i]![s]!;
        for (let a = 0; a < regs.length; a++) hf[base + a]! -= gs[a]! * v;
      }
    }
  }
}

interface SeasonRuns {
  count: number;
  start: Int32Array;
  end: Int32Array;
  season: Int32Array;
}

function seasonRuns(seasonOf: Int32Array): SeasonRuns {
  const start: number[] = [];
  const season: number[] = [];
  for (let o = 0; o < seasonOf.length; o++)
    if (o === 0 || seasonOf[o] !== seasonOf[o - 1]) {
      start.push(o);
      season.push(seasonOf[o]!);
    }
  const end = start.slice(1).concat(seasonOf.length);
  return { count: start.length, start: Int32Array.from(start), end: Int32Array.from(end), season: Int32Array.from(season) };
}

/**
 * out[s] += Σ_{o∈s} a_o, each season's sum taken in observation order (the same sums as adding one
 * observation at a time, with the running total kept in a register over a run).
 */
function addSeasonSums(out: Float64Array, runs: SeasonRuns, a: ArrayLike<number>): void {
  for (let r = 0; r < runs.count; r++) {
    const s = runs.season[r]!;
    let acc = out[s]!;
    for (let o = runs.start[r]!; o < runs.end[r]!; o++) acc += a[o]!;
    out[s] = acc;
  }
}

/** out[s] += Σ_{o∈s} a_o b_o, in observation order (see addSeasonSums). */
function addSeasonDot(out: Float64Array, runs: SeasonRuns, a: ArrayLike<number>, b: ArrayLike<number>): void {
  for (let r = 0; r < runs.count; r++) {
    const s = runs.season[r]!;
    let acc = out[s]!;
    for (let o = runs.start[r]!; o < runs.end[r]!; o++) acc += a[o]! * b[o]!;
    out[s] = acc;
  }
}

/**
 * outs[j][s] += Σ_{o∈s} a_o (bs[j]_o − means[j]_s) for every j, four columns a pass over a, each
 * season's sum in observation order (see addSeasonSums).
 */
function addSeasonCentredDots(outs: Float64Array[], runs: SeasonRuns, a: Float64Array, bs: ArrayLike<number>[], means: Float64Array[]): void {
  let j = 0;
  for (; j + 4 <= bs.length; j += 4) {
    const [o0, o1, o2, o3] = [outs[j]!, outs[j + 1]!, outs[j + 2]!, outs[j + 3]!];
    const [b0, b1, b2, b3] = [bs[j]!, bs[j + 1]!, bs[j + 2]!, bs[j + 3]!];
    const [m0, m1, m2, m3] = [means[j]!, means[j + 1]!, means[j + 2]!, means[j + 3]!];
    for (let r = 0; r < runs.count; r++) {
      const s = runs.season[r]!;
      const [c0, c1, c2, c3] = [m0[s]!, m1[s]!, m2[s]!, m3[s]!];
      let s0 = o0[s]!;
      let s1 = o1[s]!;
      let s2 = o2[s]!;
      let s3 = o3[s]!;
      for (let o = runs.start[r]!; o < runs.end[r]!; o++) {
        const x = a[o]!;
        s0 += x * (b0[o]! - c0);
        s1 += x * (b1[o]! - c1);
        s2 += x * (b2[o]! - c2);
        s3 += x * (b3[o]! - c3);
      }
      o0[s] = s0;
      o1[s] = s1;
      o2[s] = s2;
      o3[s] = s3;
    }
  }
  for (; j < bs.length; j++) {
    const out = outs[j]!;
    const b = bs[j]!;
    const m = means[j]!;
    for (let r = 0; r < runs.count; r++) {
      const s = runs.season[r]!;
      const c = m[s]!;
      let acc = out[s]!;
      for (let o = runs.start[r]!; o < runs.end[r]!; o++) acc += a[o]! * (b[o]! - c);
      out[s] = acc;
    }
  }
}
