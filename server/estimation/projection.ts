/**
 * Season projection: supply and input demand per farm and summed for the co-op at expected prices
 * (one point or several scenarios such as low/base/high), with Monte Carlo prediction intervals
 * from parameter and residual uncertainty (docs/forecasting.md §2.2):
 *   θ⁽ˢ⁾ ~ N(θ̂, V),  u⁽ˢ⁾_f ~ N(0, Σ̂) independently per farm,  y⁽ˢ⁾_f = y(p, z_f; θ⁽ˢ⁾) + u⁽ˢ⁾_f.
 * Parameter draws are shared by all farms and scenarios within a draw (they are one model), and
 * the same residual stream is reused across scenarios (common random numbers), so scenario
 * differences reflect prices, not simulation noise. Every reported figure is per item (a farm's
 * supply of one crop, the co-op's demand for one input), so each item's residual is drawn from
 * its marginal N(0, σ̂_ii) of N(0, Σ̂): the cross-item correlations of Σ̂ cannot change any of
 * these distributions, and skipping the mixing saves a third of the work. A figure that adds
 * different items (e.g. a farm's profit) would need the joint draw u = chol(Σ̂)·η. Residual
 * normals come in antithetic pairs (see antitheticNormals). The draws' summaries (mean, SD, exact
 * type-7 quantiles without a full sort) are order-statistics.ts.
 * Projections are estimates, not advice.
 */
import type { QuantitySummary } from '../../shared/estimation-types.js';
import { leadingBlock } from './curvature.js';
import { drawSettings } from './draw-options.js';
import { EstimationInputError } from './errors.js';
import type { FitResult } from './fit.js';
import { formOf } from './forms.js';
import { psdFactor } from './linalg.js';
import { netputsFromDecomposition } from './model.js';
import { drawGrid, GRID_BINS, gridOrderStatistics, quantileRanks, summarise, summariseWithMoments } from './order-statistics.js';
import { SeededRandom } from './random.js';
import { resolvePoint } from './results.js';

export interface ProjectionFarm {
  id: string;
  /** Level of every fixed factor (e.g. land). The trend follows `season` unless given here. */
  fixed: Record<string, number>;
}

export interface ProjectionScenario {
  name: string;
  /** Expected prices by item; items not named stay at their sample means. */
  prices: Record<string, number>;
}

export interface ProjectionOptions {
  /** Scenarios (e.g. low/base/high) or a single price point (named "base"). */
  scenarios: ProjectionScenario[] | Record<string, number>;
  farms: ProjectionFarm[];
  /** Monte Carlo draws (default 2000). */
  draws?: number;
  /** Seed of the generator (default 1). */
  seed?: number;
  /** Season year projected; the trend is season − first season + 1 (default: last season + 1). */
  season?: number;
  /** Include residual uncertainty (default true); false gives parameter uncertainty only. */
  residuals?: boolean;
}

export type { QuantitySummary } from '../../shared/estimation-types.js';

export interface FarmProjection {
  id: string;
  fixed: Record<string, number>;
  quantities: Record<string, QuantitySummary>;
}

export interface ScenarioProjection {
  name: string;
  prices: Record<string, number>;
  farms: FarmProjection[];
  coop: Record<string, QuantitySummary>;
  /** Parameter draws whose price Hessian is not positive semidefinite at the scenario prices. */
  curvatureViolations: number;
  curvatureViolationShare: number;
}

export interface ProjectionResult {
  draws: number;
  seed: number;
  season: number | null;
  items: { name: string; role: 'output' | 'input' }[];
  scenarios: ScenarioProjection[];
  caution: string;
}

export const PROJECTION_CAUTION =
  'Projections are estimates conditional on the stated prices and on past relationships; they are not financial advice or a recommendation to buy, sell, book, store or hedge.';

/** Project supply and input demand per farm and for the co-op, with Monte Carlo bands. */
export function projectSeason(fit: FitResult, options: ProjectionOptions): ProjectionResult {
  const { layout } = fit;
  const form = formOf(layout.form);
  const n = layout.items.length;
  const m = layout.factors.length;
  // No level option here: only draws, seed and farms are passed on, so nothing else is checked.
  const { draws: S, seed } = drawSettings({ draws: options.draws, seed: options.seed, farms: options.farms }, { what: 'the projection', defaultDraws: 2000 });
  const scenarios: ProjectionScenario[] = Array.isArray(options.scenarios) ? options.scenarios : [{ name: 'base', prices: options.scenarios }];
  if (!scenarios.length) throw new EstimationInputError('the projection needs at least one price scenario');
  const trendIdx = layout.trendOrigin !== null ? layout.factors.indexOf('trend') : -1;
  const season = trendIdx >= 0 ? (options.season ?? fit.seasonYears.last + 1) : (options.season ?? null);
  const farmZ = options.farms.map((farm) => {
    const z = new Float64Array(m);
    layout.factors.forEach((f, k) => {
      if (k === trendIdx && farm.fixed[f] === undefined) {
        z[k] = season! - layout.trendOrigin! + 1;
        return;
      }
      const v = farm.fixed[f];
      if (v === undefined || !Number.isFinite(v)) throw new EstimationInputError(`farm ${farm.id}: fixed factor "${f}" is missing or not a number`);
      z[k] = v;
    });
    for (const f of Object.keys(farm.fixed))
      if (!layout.factors.includes(f)) throw new EstimationInputError(`farm ${farm.id}: "${f}" is not a fixed factor of the model`);
    return z;
  });

  // Parameter draws θ_s = θ̂ + C ε_s (C C' = V), shared by every scenario and farm. Netput
  // coefficients and the curvature block are linear in θ for both forms, so each draw is carried
  // as ε_s and mapped through precomputed matrices.
  const k = fit.theta.length;
  const C = psdFactor(fit.covariance);
  const rngTheta = new SeededRandom(seed);
  const eps = new Float64Array(S * k);
  rngTheta.fillNormals(eps);
  const withResiduals = options.residuals ?? true;
  const sign = layout.items.map((it) => (it.role === 'output' ? 1 : -1));
  const q = layout.quadraticFactors;

  const results: ScenarioProjection[] = scenarios.map((sc) => {
    const point = resolvePoint(fit, { prices: sc.prices });
    const p = point.prices;
    const d0 = form.decompose(layout, fit.theta, p);
    // Per draw and item, the coefficients of the farm features φ = (1, z_k, ½ z_a z_b): y_i = Σ_r c_r φ_r.
    // Factors at the same level on every farm (the trend) are folded into the constant.
    const varying = layout.factors.map((_, f) => farmZ.some((z) => z[f] !== farmZ[0]![f]));
    const featureDefs: { f: number; a: number; b: number }[] = [{ f: -1, a: -1, b: -1 }];
    for (let f = 0; f < m; f++) if (varying[f]) featureDefs.push({ f, a: -1, b: -1 });
    for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) if (varying[a] || varying[b]) featureDefs.push({ f: -1, a, b });
    const F = featureDefs.length;
    const z0 = farmZ[0]!;
    const coefSoA = Array.from({ length: n }, () => Array.from({ length: F }, () => new Float64Array(S)));
    /** Farm-feature coefficients (n·F, item-major) at θ. */
    const coefAt = (th: ArrayLike<number>): Float64Array => {
      const d = form.decompose(layout, th, p);
      const out = new Float64Array(n * F);
      for (let i = 0; i < n; i++) {
        let c0 = d.constant[i]!;
        for (let f = 0; f < m; f++) if (!varying[f]) c0 += d.linear[i]![f]! * z0[f]!;
        for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) if (!varying[a] && !varying[b]) c0 += 0.5 * d.quadratic[i]![a]![b]! * z0[a]! * z0[b]!;
        out[i * F] = c0;
        for (let r = 1; r < F; r++) {
          const def = featureDefs[r]!;
          out[i * F + r] = def.f >= 0 ? d.linear[i]![def.f]! : d.quadratic[i]![def.a]![def.b]!;
        }
      }
      return out;
    };
    const block = form.curvatureBlock(layout, p);
    const curvAt = (th: ArrayLike<number>): Float64Array => Float64Array.from((block.global ? block.toMatrix(th) : leadingBlock(form.priceHessian(layout, th, p))).flat());
    const cMap = linearMap(coefAt, k, fit.theta, C);
    const kMap = linearMap(curvAt, k, fit.theta, C);
    const size = block.size;
    let violations = 0;
    const cs = new Float64Array(n * F);
    const kb = new Float64Array(size * size);
    for (let s = 0; s < S; s++) {
      applyMap(cMap, eps, s * k, cs);
      for (let i = 0; i < n; i++) for (let r = 0; r < F; r++) coefSoA[i]![r]![s] = cs[i * F + r]!;
      applyMap(kMap, eps, s * k, kb);
      if (!isPsd(kb, size)) violations++;
    }
    // Exact mean and SD of each farm's projection (the model is linear in θ and u is normal):
    // they set the histogram grid of the quantile search in farmItemKernel.
    const W = Array.from({ length: n }, (_, i) =>
      Array.from({ length: F }, (_, r) => Array.from({ length: F }, (_, r2) => {
        let acc = 0;
        const a = cMap.M.subarray((i * F + r) * k, (i * F + r + 1) * k);
        const b = cMap.M.subarray((i * F + r2) * k, (i * F + r2 + 1) * k);
        for (let j = 0; j < k; j++) acc += a[j]! * b[j]!;
        return acc;
      })),
    );
    const rng = new SeededRandom(seed ^ 0x5bd1e995);
    const coop = Array.from({ length: n }, () => new Float64Array(S));
    const coopPoint = new Float64Array(n);
    const buf = Array.from({ length: n }, () => new Float64Array(S));
    const phi = new Float64Array(F);
    const eta = new Float64Array(S);
    const moments = new Float64Array(4);
    const farms: FarmProjection[] = options.farms.map((farm, fi) => {
      const z = farmZ[fi]!;
      phi[0] = 1;
      for (let r = 1; r < F; r++) {
        const def = featureDefs[r]!;
        phi[r] = def.f >= 0 ? z[def.f]! : 0.5 * z[def.a]! * z[def.b]!;
      }
      const yPoint = netputsFromDecomposition(d0, z);
      const quantities: Record<string, QuantitySummary> = {};
      layout.items.forEach((it, i) => {
        const pt = sign[i]! * yPoint[i]!;
        let varP = 0;
        for (let r = 0; r < F; r++) for (let r2 = 0; r2 < F; r2++) varP += phi[r]! * W[i]![r]![r2]! * phi[r2]!;
        const sdExact = Math.sqrt(Math.max(varP + (withResiduals ? fit.sigma[i]![i]! : 0), 0));
        if (withResiduals) antitheticNormals(rng, eta);
        const order = farmItemKernel(buf[i]!, coop[i]!, coefSoA[i]!, phi, withResiduals ? eta : null, Math.sqrt(fit.sigma[i]![i]!), sign[i]!, moments, pt, sdExact, quantileRanks(S));
        coopPoint[i]! += pt;
        quantities[it.name] = summariseWithMoments(buf[i]!, pt, moments, order);
      });
      return { id: farm.id, fixed: Object.fromEntries(layout.factors.map((f, kk) => [f, z[kk]!])), quantities };
    });
    const coopSummary: Record<string, QuantitySummary> = {};
    layout.items.forEach((it, i) => (coopSummary[it.name] = summarise(coop[i]!, coopPoint[i]!)));
    return {
      name: sc.name,
      prices: Object.fromEntries(layout.items.map((it, i) => [it.name, p[i]!])),
      farms,
      coop: coopSummary,
      curvatureViolations: violations,
      curvatureViolationShare: violations / S,
    };
  });
  return {
    draws: S,
    seed,
    season,
    items: layout.items.map((it) => ({ name: it.name, role: it.role })),
    scenarios: results,
    caution: PROJECTION_CAUTION,
  };
}

/** The grid's upper end bin, read once (an imported binding read in the loop costs time under some loaders). */
const LAST_BIN = GRID_BINS + 1;

/**
 * One farm and item, all draws, in one pass: out = sign·(Σ_r c_r φ_r + √σ_ii·η), coop += out,
 * the moments of out, and a histogram of out on a grid set by the exact mean and SD of the
 * projection (order-statistics.ts: mean ± 8 sd in steps of sd/64). A second, cheap pass there
 * gives the exact order statistics of the 5/50/95% points. Returns them by rank, or null when a
 * rank falls outside the grid.
 */
function farmItemKernel(
  out: Float64Array,
  coop: Float64Array,
  coef: Float64Array[],
  phi: Float64Array,
  eta: Float64Array | null,
  residualSd: number,
  sign: number,
  moments: Float64Array,
  mean: number,
  sd: number,
  ranks: number[],
): Map<number, number> | null {
  const S = out.length;
  // Three features unrolled (constant, one fixed factor and its square: the usual case); more
  // features are summed into `extra` first.
  const F = coef.length;
  const c0 = coef[0]!;
  const c1 = F > 1 ? coef[1]! : c0;
  const c2 = F > 2 ? coef[2]! : c0;
  const f0 = phi[0]!;
  const f1 = F > 1 ? phi[1]! : 0;
  const f2 = F > 2 ? phi[2]! : 0;
  let extra: Float64Array | null = null;
  if (F > 3) {
    extra = new Float64Array(S);
    for (let r = 3; r < F; r++) {
      const c = coef[r]!;
      const f = phi[r]!;
      for (let s = 0; s < S; s++) extra[s]! += c[s]! * f;
    }
  }
  const e = eta ?? c0;
  const sdRes = eta ? residualSd : 0;
  const grid = drawGrid(mean, sd);
  const { lo, scale, counts } = grid;
  const shift = sign * (c0[0]! * f0 + c1[0]! * f1 + c2[0]! * f2 + (extra ? extra[0]! : 0) + sdRes * e[0]!);
  let s1 = 0;
  let s2 = 0;
  for (let s = 0; s < S; s++) {
    let v = c0[s]! * f0 + c1[s]! * f1 + c2[s]! * f2 + sdRes * e[s]!;
    if (extra) v += extra[s]!;
    v *= sign;
    out[s] = v;
    coop[s]! += v;
    const d = v - shift;
    s1 += d;
    s2 += d * d;
    // gridBin(v, lo, scale) written out: the call costs about a tenth of the projection's time here
    let b = ((v - lo) * scale + 1) | 0;
    b = b < 0 ? 0 : b > LAST_BIN ? LAST_BIN : b;
    counts[b]!++;
  }
  moments[0] = shift + s1 / S;
  moments[1] = S > 1 ? Math.sqrt(Math.max(s2 - (s1 * s1) / S, 0) / (S - 1)) : 0;
  moments[2] = -Infinity; // range not tracked: the fallback computes it
  moments[3] = Infinity;
  return gridOrderStatistics(out, grid, ranks);
}

/**
 * Residual normals as antithetic pairs: draw s and draw s + ⌊S/2⌋ use η and −η (a fresh normal
 * for an odd last draw). Each draw's residual is still exactly N(0, 1) and independent of θ, the
 * pairs halve the random-number generation, and the negative pairing lowers the Monte Carlo error
 * of the means (antithetic variates, a standard variance-reduction device).
 */
function antitheticNormals(rng: SeededRandom, out: Float64Array): void {
  const half = out.length >>> 1;
  const first = out.subarray(0, half);
  rng.fillNormals(first);
  for (let s = 0; s < half; s++) out[half + s] = -first[s]!;
  if (out.length % 2 === 1) out[out.length - 1] = rng.normal();
}

interface LinearMap {
  /** Value at θ̂. */
  base: Float64Array;
  /** ∂value/∂θ · C (rows: outputs, k columns), so value(θ̂ + Cε) = base + M ε. */
  M: Float64Array;
  rows: number;
}

/**
 * Express f(θ̂ + Cε) = f(θ̂) + (J C) ε for an f that is linear in θ (J by unit differences,
 * exact for a linear f; checked on one random direction).
 */
function linearMap(f: (th: ArrayLike<number>) => Float64Array, k: number, theta: number[], C: number[][]): LinearMap {
  const base = f(theta);
  const rows = base.length;
  const J = new Float64Array(rows * k);
  for (let j = 0; j < k; j++) {
    const scale = Math.max(Math.abs(theta[j]!), 1);
    const th = theta.slice();
    th[j]! += scale;
    const v = f(th);
    for (let r = 0; r < rows; r++) J[r * k + j] = (v[r]! - base[r]!) / scale;
  }
  const M = new Float64Array(rows * k);
  for (let r = 0; r < rows; r++)
    for (let j = 0; j < k; j++) {
      let acc = 0;
      for (let l = 0; l < k; l++) acc += J[r * k + l]! * C[l]![j]!;
      M[r * k + j] = acc;
    }
  // linearity check along one direction
  const dir = theta.map((t, j) => t + 0.37 * (C[j]!.reduce((a, v) => a + v, 0) || 1));
  const direct = f(dir);
  for (let r = 0; r < rows; r++) {
    let pred = base[r]!;
    for (let j = 0; j < k; j++) pred += J[r * k + j]! * (dir[j]! - theta[j]!);
    if (Math.abs(pred - direct[r]!) > 1e-8 * Math.max(Math.abs(direct[r]!), Math.abs(base[r]!), 1)) throw new Error('projection: netputs are not linear in the parameters');
  }
  return { base, M, rows };
}

function applyMap(map: LinearMap, eps: Float64Array, offset: number, out: Float64Array): void {
  const { base, M, rows } = map;
  const k = M.length / rows;
  for (let r = 0; r < rows; r++) {
    let acc = base[r]!;
    const ro = r * k;
    for (let j = 0; j < k; j++) acc += M[ro + j]! * eps[offset + j]!;
    out[r] = acc;
  }
}

/** PSD within tolerance: Cholesky of A + δI with δ = 1e-9·max|a_ii| succeeds. */
function isPsd(a: Float64Array, size: number): boolean {
  let scale = 0;
  for (let i = 0; i < size; i++) scale = Math.max(scale, Math.abs(a[i * size + i]!));
  if (scale === 0) return true;
  const delta = 1e-9 * scale;
  const l = new Float64Array(size * size);
  for (let j = 0; j < size; j++) {
    let d = a[j * size + j]! + delta;
    for (let c = 0; c < j; c++) d -= l[j * size + c]! ** 2;
    if (!(d > 0)) return false;
    const ljj = Math.sqrt(d);
    l[j * size + j] = ljj;
    for (let i = j + 1; i < size; i++) {
      let acc = 0.5 * (a[i * size + j]! + a[j * size + i]!);
      for (let c = 0; c < j; c++) acc -= l[i * size + c]! * l[j * size + c]!;
      l[i * size + j] = acc / ljj;
    }
  }
  return true;
}
