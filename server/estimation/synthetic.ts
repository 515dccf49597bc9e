/**
 * Synthetic netput panels drawn from a known, convex normalized quadratic technology: for tests,
 * fixtures, benchmarks and the demo co-op only (invented data; never a source of check values on
 * its own — the checks compare a fit of these data with an outside reference or with the known
 * technology).
 */
import type { NetputDataset, NetputItem } from './dataset.js';
import { choleskyLower, zeros, type Mat } from './linalg.js';
import type { ModelLayout } from './model.js';
import { normalizedQuadratic } from './nq.js';
import { SeededRandom } from './random.js';

export interface SyntheticItem extends NetputItem {
  /** Mean price (money per unit). */
  price: number;
  /** Mean quantity per farm of average size (>= 0). */
  quantity: number;
  /** Own-price elasticity at the means (non-numeraire items). */
  ownElasticity?: number;
  /** Quantity change per season of the trend, as a share of the mean (default 0). */
  trendShare?: number;
}

export interface SyntheticSpec {
  /** Items; the last one is the numeraire (an input). */
  items: SyntheticItem[];
  /** Off-diagonal correlation −ρ between the B columns (must be < 1/(n−2)). Default 0.15. */
  rho?: number;
  farms: number;
  seasons: number;
  firstSeason: number;
  /** Mean and spread (uniform ± half-width) of farm land in hectares. Default 500 ± 300. */
  landMean?: number;
  landHalfWidth?: number;
  /** ∂²π̃/∂land² (< 0 keeps the long run defined). Default −0.01. */
  landCurvature?: number;
  /** Share of each netput proportional to land at the means (default 0.8). */
  landShare?: number;
  /** Season-to-season log price standard deviation (default 0.12) and farm-level basis (0.03). */
  priceSd?: number;
  basisSd?: number;
  /** Residual standard deviation as a share of |mean netput| (default 0.04). */
  noise?: number;
  /** Include land and a trend (default true). */
  withLand?: boolean;
  withTrend?: boolean;
  seed: number;
}

export interface SyntheticPanel {
  dataset: NetputDataset;
  /** Layout and true θ of the NQ technology (numeraire last, factors land then trend). */
  layout: ModelLayout;
  theta: number[];
}

/** The demo technology: two crops, three inputs with "other inputs" (a price index) as numeraire. */
export const DEMO_ITEMS: SyntheticItem[] = [
  { name: 'wheat', role: 'output', price: 250, quantity: 1500, ownElasticity: 0.4, trendShare: 0.01 },
  { name: 'canola', role: 'output', price: 520, quantity: 400, ownElasticity: 0.6, trendShare: 0.015 },
  { name: 'nitrogen', role: 'input', price: 120, quantity: 600, ownElasticity: -0.5, trendShare: 0.005 },
  { name: 'diesel', role: 'input', price: 110, quantity: 400, ownElasticity: -0.3, trendShare: -0.005 },
  { name: 'other', role: 'input', price: 100, quantity: 2000 },
];

export function generateNqPanel(spec: SyntheticSpec): SyntheticPanel {
  const rng = new SeededRandom(spec.seed);
  const items = spec.items;
  const n = items.length;
  const nn = n - 1;
  const withLand = spec.withLand ?? true;
  const withTrend = spec.withTrend ?? true;
  const landMean = spec.landMean ?? 500;
  const landHalf = spec.landHalfWidth ?? 300;
  const g = spec.landCurvature ?? -0.01;
  const landShare = withLand ? (spec.landShare ?? 0.8) : 0;
  const rho = spec.rho ?? 0.15;
  const factors = [...(withLand ? ['land'] : []), ...(withTrend ? ['trend'] : [])];
  const layout: ModelLayout = {
    form: 'normalized-quadratic',
    items: items.map(({ name, role }) => ({ name, role })),
    numeraire: items[nn]!.name,
    factors,
    quadraticFactors: withLand ? 1 : 0,
    trendOrigin: withTrend ? spec.firstSeason : null,
    parameterNames: normalizedQuadratic.parameterNames(items, factors, withLand ? 1 : 0),
  };
  const pn = items[nn]!.price;
  const pt = items.slice(0, nn).map((it) => it.price / pn);
  const ybar = items.map((it) => (it.role === 'output' ? it.quantity : -it.quantity));
  const tMean = (spec.seasons + 1) / 2;
  // B = D R D, R = (1+ρ)I − ρ11', D_i = √(e_ii ȳ_i / p̃_i).
  const D = items.slice(0, nn).map((it, i) => Math.sqrt(((it.ownElasticity ?? 0.3) * ybar[i]!) / pt[i]!));
  if (D.some((d) => !Number.isFinite(d))) throw new Error('synthetic: own elasticities must have the sign of the netput');
  const B: Mat = zeros(nn, nn);
  for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) B[i]![j] = D[i]! * D[j]! * (i === j ? 1 : -rho);
  if (!choleskyLower(B)) throw new Error('synthetic: B is not positive definite (lower rho)');
  const theta = new Array<number>(layout.parameterNames.length).fill(0);
  const name = (s: string): number => {
    const k = layout.parameterNames.indexOf(s);
    if (k < 0) throw new Error(`synthetic: no parameter ${s}`);
    return k;
  };
  const it = items.map((x) => x.name);
  for (let i = 0; i < nn; i++) {
    let v = ybar[i]!;
    for (let j = i; j < nn; j++) theta[name(`b[${it[i]},${it[j]}]`)] = B[i]![j]!;
    for (let j = 0; j < nn; j++) v -= B[i]![j]! * pt[j]!;
    if (withLand) {
      const c = (landShare * ybar[i]!) / landMean;
      theta[name(`c[${it[i]},land]`)] = c;
      v -= c * landMean;
    }
    if (withTrend) {
      const c = (items[i]!.trendShare ?? 0) * ybar[i]!;
      theta[name(`c[${it[i]},trend]`)] = c;
      v -= c * tMean;
    }
    theta[name(`a[${it[i]}]`)] = v;
  }
  // Numeraire: y_n = a0 − ½p̃'Bp̃ + d·z + ½ g land².
  let a0 = ybar[nn]!;
  for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) a0 += 0.5 * B[i]![j]! * pt[i]! * pt[j]!;
  if (withLand) {
    const slope = (landShare * ybar[nn]!) / landMean; // ∂y_n/∂land at the mean land
    const d = slope - g * landMean;
    theta[name('d[land]')] = d;
    theta[name('g[land,land]')] = g;
    a0 -= d * landMean + 0.5 * g * landMean * landMean;
  }
  if (withTrend) {
    const d = (items[nn]!.trendShare ?? 0) * ybar[nn]!;
    theta[name('d[trend]')] = d;
    a0 -= d * tMean;
  }
  theta[name('a0')] = a0;

  const priceSd = spec.priceSd ?? 0.12;
  const basisSd = spec.basisSd ?? 0.03;
  const noise = spec.noise ?? 0.04;
  const land = Array.from({ length: spec.farms }, () => landMean + landHalf * (2 * rng.uniform() - 1));
  const seasonPrices = Array.from({ length: spec.seasons }, () => items.map((x) => x.price * Math.exp(priceSd * rng.normal() - 0.5 * priceSd * priceSd)));
  const T = spec.farms * spec.seasons;
  const ds: NetputDataset = {
    items: layout.items.map((x) => ({ ...x })),
    fixedFactors: withLand ? ['land'] : [],
    seasons: [],
    seasonYears: [],
    farms: [],
    prices: items.map(() => new Array<number>(T)),
    quantities: items.map(() => new Array<number>(T)),
    fixed: withLand ? [new Array<number>(T)] : [],
    rows: [],
  };
  const form = normalizedQuadratic;
  let obs = 0;
  for (let s = 0; s < spec.seasons; s++) {
    for (let f = 0; f < spec.farms; f++) {
      const p = items.map((_, i) => round(seasonPrices[s]![i]! * Math.exp(basisSd * rng.normal()), 4));
      const landF = round(land[f]! * (1 + 0.02 * rng.normal()), 2);
      const z = [...(withLand ? [landF] : []), ...(withTrend ? [s + 1] : [])];
      const d = form.decompose(layout, theta, p);
      const scale = withLand ? landF / landMean : 1;
      items.forEach((x, i) => {
        let y = d.constant[i]!;
        for (let k = 0; k < z.length; k++) y += d.linear[i]![k]! * z[k]!;
        for (let k = 0; k < z.length; k++) for (let l = 0; l < z.length; l++) y += 0.5 * d.quadratic[i]![k]![l]! * z[k]! * z[l]!;
        y += noise * Math.abs(ybar[i]!) * scale * rng.normal();
        const q = x.role === 'output' ? y : -y;
        if (!(q > 0)) throw new Error(`synthetic: a ${x.role} quantity came out non-positive; lower the noise or the price spread`);
        ds.prices[i]![obs] = p[i]!;
        ds.quantities[i]![obs] = round(q, 3);
      });
      if (withLand) ds.fixed[0]![obs] = landF;
      ds.seasons.push(String(spec.firstSeason + s));
      ds.seasonYears.push(spec.firstSeason + s);
      ds.farms!.push(`F${String(f + 1).padStart(3, '0')}`);
      ds.rows.push(obs + 2);
      obs++;
    }
  }
  return { dataset: ds, layout, theta };
}

function round(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}

/** Write a dataset in the netput CSV layout (season, farm, price:, output:/input:, fixed:). */
export function datasetToCsv(ds: NetputDataset): string {
  const header = ['season', ...(ds.farms ? ['farm'] : []), ...ds.items.map((i) => `price:${i.name}`), ...ds.items.map((i) => `${i.role}:${i.name}`), ...ds.fixedFactors.map((f) => `fixed:${f}`)];
  const lines = [header.join(',')];
  for (let t = 0; t < ds.seasons.length; t++) {
    lines.push(
      [ds.seasons[t]!, ...(ds.farms ? [ds.farms[t]!] : []), ...ds.prices.map((p) => String(p[t])), ...ds.quantities.map((q) => String(q[t])), ...ds.fixed.map((z) => String(z[t]))].join(','),
    );
  }
  return lines.join('\n') + '\n';
}

export interface RankDeficientSpec {
  /** Items, the last one the numeraire of the true technology; mean prices and quantities. */
  items: SyntheticItem[];
  /** Columns of the true factor F (B = F F′, (n−1)×r): r < n−1 makes the true B singular. */
  factor: Mat;
  /** Observations (seasons of one farm, one per year). */
  seasons: number;
  firstSeason: number;
  /** Log price standard deviation (default 0.25). */
  priceSd?: number;
  /** Residual standard deviation as a share of |mean netput| (default 0.05). */
  noise?: number;
  /** Quantity change per season as a share of the mean (default 0: no trend in the truth). */
  trendShare?: number;
  seed: number;
}

/**
 * One farm's netput history from a normalized quadratic technology whose price Hessian B = F F′
 * has rank below n − 1 (a technology on the boundary of convexity). With sampling noise the
 * unrestricted estimate of B is then usually not positive semidefinite and the convexity-
 * constrained optimum is rank-deficient: the case the constrained fit must handle
 * (docs/profit-functions.md §"Imposing convexity"). Invented data, for tests only.
 */
export function generateRankDeficientPanel(spec: RankDeficientSpec): NetputDataset {
  const rng = new SeededRandom(spec.seed);
  const items = spec.items;
  const n = items.length;
  const nn = n - 1;
  const F = spec.factor;
  const B: Mat = Array.from({ length: nn }, (_, i) => Array.from({ length: nn }, (_, j) => F[i]!.reduce((s, f, c) => s + f * F[j]![c]!, 0)));
  const pn = items[nn]!.price;
  const ptBar = items.slice(0, nn).map((it) => it.price / pn);
  const ybar = items.map((it) => (it.role === 'output' ? it.quantity : -it.quantity));
  const priceSd = spec.priceSd ?? 0.25;
  const noise = spec.noise ?? 0.05;
  const trendShare = spec.trendShare ?? 0;
  const tMean = (spec.seasons + 1) / 2;
  const a = ybar.slice(0, nn).map((y, i) => y - B[i]!.reduce((s, b, j) => s + b * ptBar[j]!, 0));
  let a0 = ybar[nn]!;
  for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) a0 += 0.5 * B[i]![j]! * ptBar[i]! * ptBar[j]!;
  const T = spec.seasons;
  const ds: NetputDataset = {
    items: items.map(({ name, role }) => ({ name, role })),
    fixedFactors: [],
    seasons: [],
    seasonYears: [],
    farms: null,
    prices: items.map(() => new Array<number>(T)),
    quantities: items.map(() => new Array<number>(T)),
    fixed: [],
    rows: [],
  };
  for (let t = 0; t < T; t++) {
    const p = items.map((it) => round(it.price * Math.exp(priceSd * rng.normal() - 0.5 * priceSd * priceSd), 4));
    const pt = p.slice(0, nn).map((v) => v / p[nn]!);
    const trend = t + 1 - tMean;
    const y = items.map((_, i) => {
      let v: number;
      if (i < nn) v = a[i]! + B[i]!.reduce((s, b, j) => s + b * pt[j]!, 0);
      else {
        v = a0;
        for (let k = 0; k < nn; k++) for (let l = 0; l < nn; l++) v -= 0.5 * B[k]![l]! * pt[k]! * pt[l]!;
      }
      return v + trendShare * ybar[i]! * trend + noise * Math.abs(ybar[i]!) * rng.normal();
    });
    items.forEach((it, i) => {
      const q = it.role === 'output' ? y[i]! : -y[i]!;
      if (!(q > 0)) throw new Error(`synthetic: a ${it.role} quantity came out non-positive; lower the noise or the price spread`);
      ds.prices[i]![t] = p[i]!;
      ds.quantities[i]![t] = round(q, 3);
    });
    ds.seasons.push(String(spec.firstSeason + t));
    ds.seasonYears.push(spec.firstSeason + t);
    ds.rows.push(t + 2);
  }
  return ds;
}
