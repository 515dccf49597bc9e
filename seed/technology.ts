import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

/**
 * The invented technology behind the demo co-op's farm records: a normalised quadratic profit
 * function per hectare of land (constant returns to the quasi-fixed land), hired labour as
 * numeraire, and a linear trend. A farm's netputs are its land times the per-hectare netputs, plus
 * its own productivity, a season-wide weather shock and its own error (see demo-coop.ts).
 * All figures here are invented for the demo; they are not estimates of any real farm.
 */
export interface DemoItem {
  code: string;
  name: string;
  role: 'output' | 'input';
  category: 'grain' | 'oilseed' | 'fertiliser' | 'fuel' | 'labour';
  unit: string;
  /** Price at the centre of the demo's history, per unit, EUR. */
  basePrice: number;
  /** Farm-level quantity (positive) at base prices for a 400 ha farm in the middle season. */
  baseQuantity: number;
  /**
   * Own-price elasticity at the base point that the technology below implies (the numeraire's
   * included: it follows from the others by homogeneity and symmetry; seed/demo-coop.test.ts checks it).
   */
  ownElasticity: number;
  /** Yearly drift of the quantity from technical change, share of baseQuantity. */
  trendShare: number;
  nPct?: number;
  p2o5Pct?: number;
  k2oPct?: number;
}

export const DEMO_ITEMS: DemoItem[] = [
  { code: 'wheat', name: 'Wheat', role: 'output', category: 'grain', unit: 't', basePrice: 195, baseQuantity: 1540, ownElasticity: 0.32, trendShare: 0.009 },
  { code: 'canola', name: 'Canola (rapeseed)', role: 'output', category: 'oilseed', unit: 't', basePrice: 410, baseQuantity: 560, ownElasticity: 0.38, trendShare: 0.012 },
  { code: 'nitrogen', name: 'Nitrogen (N)', role: 'input', category: 'fertiliser', unit: 'kg N', basePrice: 1.15, baseQuantity: 62000, ownElasticity: -0.4, trendShare: 0.004, nPct: 100 },
  { code: 'phosphate', name: 'Phosphate (P2O5)', role: 'input', category: 'fertiliser', unit: 'kg P2O5', basePrice: 0.95, baseQuantity: 21000, ownElasticity: -0.43, trendShare: -0.002, p2o5Pct: 100 },
  { code: 'potash', name: 'Potash (K2O)', role: 'input', category: 'fertiliser', unit: 'kg K2O', basePrice: 0.7, baseQuantity: 17000, ownElasticity: -0.5, trendShare: -0.003, k2oPct: 100 },
  { code: 'diesel', name: 'Diesel', role: 'input', category: 'fuel', unit: 'L', basePrice: 1.05, baseQuantity: 33000, ownElasticity: -0.3, trendShare: -0.004 },
  { code: 'labour', name: 'Hired labour', role: 'input', category: 'labour', unit: 'h', basePrice: 19, baseQuantity: 2600, ownElasticity: -0.29, trendShare: -0.01 },
];

export const NUMERAIRE = 'labour';
export const BASE_LAND_HA = 400;
export const MID_TREND = 10;

/**
 * How strongly each pair of items trades off, in EUR of a 400 ha farm at base prices. The price
 * Hessian in value terms, S_ij = ∂y_i/∂p_j · p_i p_j, is the weighted Laplacian of these weights:
 * symmetric, rows summing to zero (homogeneity) and positive semidefinite (convexity) by
 * construction, and every elasticity is e_ij = S_ij / (p_i y_i). Wheat and canola compete for land;
 * every crop draws on the inputs; the numeraire's own response follows from its column like any other.
 */
const WEIGHTS: [string, string, number][] = [
  ['wheat', 'canola', 60000],
  ['wheat', 'nitrogen', 16000],
  ['wheat', 'phosphate', 4000],
  ['wheat', 'potash', 2500],
  ['wheat', 'diesel', 6000],
  ['wheat', 'labour', 8000],
  ['canola', 'nitrogen', 12000],
  ['canola', 'phosphate', 3500],
  ['canola', 'potash', 2500],
  ['canola', 'diesel', 3000],
  ['canola', 'labour', 5500],
  ['nitrogen', 'diesel', 500],
  ['phosphate', 'potash', 1000],
  ['diesel', 'labour', 1000],
];

export interface Technology {
  /** Non-numeraire item codes, the order of B, a, e. */
  codes: string[];
  /** Per hectare: ∂(y_i/L)/∂p̃_j of the non-numeraire items (symmetric, positive semidefinite). */
  B: number[][];
  /** Per-hectare intercepts and trend coefficients of the non-numeraire netput equations. */
  a: number[];
  eTrend: number[];
  /** Numeraire per hectare: y_n/L = a0 − ½ p̃'Bp̃ + dTrend·t. */
  a0: number;
  dTrend: number;
}

function signOf(it: DemoItem) {
  return it.role === 'output' ? 1 : -1;
}

/** The full value-Hessian S (all items, numeraire included) of a 400 ha farm at base prices. */
export function valueHessian(): { codes: string[]; S: number[][] } {
  const codes = DEMO_ITEMS.map((i) => i.code);
  const n = codes.length;
  const S = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (const [a, b, w] of WEIGHTS) {
    const i = codes.indexOf(a);
    const j = codes.indexOf(b);
    S[i][i] += w;
    S[j][j] += w;
    S[i][j] -= w;
    S[j][i] -= w;
  }
  return { codes, S };
}

/** Builds the per-hectare B from the value Hessian, and intercepts that hit the base quantities. */
export function buildTechnology(): Technology {
  const num = DEMO_ITEMS.find((i) => i.code === NUMERAIRE)!;
  const others = DEMO_ITEMS.filter((i) => i.code !== NUMERAIRE);
  const { codes, S } = valueHessian();
  const pn = num.basePrice;
  const pt = others.map((i) => i.basePrice / pn);
  // S_ij = H_ij p_i p_j with H_ij = B_ij / p_n (B in normalised prices), per 400 ha → per hectare.
  const B = others.map((a, i) => others.map((b, j) => S[codes.indexOf(a.code)][codes.indexOf(b.code)] / (pn * pt[i] * pt[j]) / BASE_LAND_HA));
  const minEig = Math.min(...new EigenvalueDecomposition(new Matrix(B)).realEigenvalues);
  if (!(minEig > 0)) throw new Error('The demo technology is not convex in prices');
  const yHa = others.map((i) => (signOf(i) * i.baseQuantity) / BASE_LAND_HA);
  const eTrend = others.map((it, i) => signOf(it) * it.trendShare * Math.abs(yHa[i]));
  const a = yHa.map((v, i) => v - B[i].reduce((s, b, j) => s + b * pt[j], 0) - eTrend[i] * MID_TREND);
  const ynHa = -num.baseQuantity / BASE_LAND_HA;
  const quad = 0.5 * pt.reduce((s, pi, i) => s + pi * B[i].reduce((t, b, j) => t + b * pt[j], 0), 0);
  const dTrend = (-num.trendShare * num.baseQuantity) / BASE_LAND_HA;
  const a0 = ynHa + quad - dTrend * MID_TREND;
  return { codes: others.map((o) => o.code), B, a, eTrend, a0, dTrend };
}

/** Netputs per hectare (outputs +, inputs −) of every item, numeraire last, at prices (EUR per unit) and trend. */
export function netputsPerHa(tech: Technology, prices: Record<string, number>, trend: number): Record<string, number> {
  const pn = prices[NUMERAIRE];
  const pt = tech.codes.map((c) => prices[c] / pn);
  const out: Record<string, number> = {};
  tech.codes.forEach((c, i) => {
    out[c] = tech.a[i] + tech.B[i].reduce((s, b, j) => s + b * pt[j], 0) + tech.eTrend[i] * trend;
  });
  const quad = 0.5 * pt.reduce((s, pi, i) => s + pi * tech.B[i].reduce((t, b, j) => t + b * pt[j], 0), 0);
  out[NUMERAIRE] = tech.a0 - quad + tech.dTrend * trend;
  return out;
}

/** Netputs of a farm of `landHa` hectares: constant returns to land. */
export function netputs(tech: Technology, prices: Record<string, number>, landHa: number, trend: number): Record<string, number> {
  const perHa = netputsPerHa(tech, prices, trend);
  return Object.fromEntries(Object.entries(perHa).map(([k, v]) => [k, v * landHa]));
}
