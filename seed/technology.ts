import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

/**
 * The invented technology behind the demo co-op's farm records: a normalised quadratic profit
 * function with hired labour as numeraire, land as a quasi-fixed factor and a linear trend.
 * Records generated from it (plus noise) let a fitted model recover sensible elasticities.
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
  /** Own-price elasticity the demo technology is built around. */
  ownElasticity: number;
  /** Yearly drift of the quantity from technical change, share of baseQuantity. */
  trendShare: number;
  nPct?: number;
  p2o5Pct?: number;
  k2oPct?: number;
}

export const DEMO_ITEMS: DemoItem[] = [
  { code: 'wheat', name: 'Wheat', role: 'output', category: 'grain', unit: 't', basePrice: 195, baseQuantity: 1540, ownElasticity: 0.35, trendShare: 0.009 },
  { code: 'canola', name: 'Canola (rapeseed)', role: 'output', category: 'oilseed', unit: 't', basePrice: 410, baseQuantity: 560, ownElasticity: 0.45, trendShare: 0.012 },
  { code: 'nitrogen', name: 'Nitrogen (N)', role: 'input', category: 'fertiliser', unit: 'kg N', basePrice: 1.15, baseQuantity: 62000, ownElasticity: -0.4, trendShare: 0.004, nPct: 100 },
  { code: 'phosphate', name: 'Phosphate (P2O5)', role: 'input', category: 'fertiliser', unit: 'kg P2O5', basePrice: 0.95, baseQuantity: 21000, ownElasticity: -0.5, trendShare: -0.002, p2o5Pct: 100 },
  { code: 'potash', name: 'Potash (K2O)', role: 'input', category: 'fertiliser', unit: 'kg K2O', basePrice: 0.7, baseQuantity: 17000, ownElasticity: -0.55, trendShare: -0.003, k2oPct: 100 },
  { code: 'diesel', name: 'Diesel', role: 'input', category: 'fuel', unit: 'L', basePrice: 1.05, baseQuantity: 33000, ownElasticity: -0.25, trendShare: -0.004 },
  { code: 'labour', name: 'Hired labour', role: 'input', category: 'labour', unit: 'h', basePrice: 19, baseQuantity: 2600, ownElasticity: -0.3, trendShare: -0.01 },
];

export const NUMERAIRE = 'labour';
export const BASE_LAND_HA = 400;
export const MID_TREND = 10;

/** Cross-price elasticities at the base point (row quantity, column price), before symmetry. */
const CROSS: Record<string, Record<string, number>> = {
  wheat: { canola: -0.12, nitrogen: -0.06, phosphate: -0.02, potash: -0.015, diesel: -0.03 },
  canola: { nitrogen: -0.05, phosphate: -0.02, potash: -0.02, diesel: -0.02 },
  nitrogen: { phosphate: -0.05, potash: -0.03, diesel: -0.02 },
  phosphate: { potash: -0.08, diesel: -0.01 },
  potash: { diesel: -0.01 },
};

export interface Technology {
  /** Non-numeraire item codes, the order of B, a, c, e. */
  codes: string[];
  B: number[][];
  /** Intercepts, land and trend coefficients of the non-numeraire netput equations. */
  a: number[];
  cLand: number[];
  eTrend: number[];
  /** Numeraire equation: y_n = a0 − ½ p̃'Bp̃ + dLand·land + dTrend·t. */
  a0: number;
  dLand: number;
  dTrend: number;
}

function signOf(it: DemoItem) {
  return it.role === 'output' ? 1 : -1;
}

/** Builds B from the target elasticities (made symmetric and convex), then intercepts that hit the base quantities. */
export function buildTechnology(): Technology {
  const num = DEMO_ITEMS.find((i) => i.code === NUMERAIRE)!;
  const others = DEMO_ITEMS.filter((i) => i.code !== NUMERAIRE);
  const n = others.length;
  const pt = others.map((i) => i.basePrice / num.basePrice);
  const y = others.map((i) => signOf(i) * i.baseQuantity);
  const B = Matrix.zeros(n, n);
  // e_ij = b_ij p̃_j / y_i  →  b_ij = e_ij y_i / p̃_j ; own terms positive for outputs and inputs alike.
  for (let i = 0; i < n; i++) B.set(i, i, (others[i].ownElasticity * y[i]) / pt[i]);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const eij = CROSS[others[i].code]?.[others[j].code] ?? 0;
      // e_ij is read as the elasticity of the quantity of i; with signed netputs the same formula holds for all pairs.
      const bij = (eij * y[i]) / pt[j];
      B.set(i, j, bij);
      B.set(j, i, bij);
    }
  }
  // Shrink the off-diagonal part until B is comfortably positive definite.
  let shrink = 1;
  const D = Matrix.diag(B.diag());
  let Bc = B.clone();
  // Judge definiteness on the scaled matrix D^-1/2 B D^-1/2: the diagonal spans orders of magnitude.
  const scale = B.diag().map((d) => 1 / Math.sqrt(d));
  for (let tries = 0; tries < 50; tries++) {
    const S = Bc.clone();
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) S.set(i, j, S.get(i, j) * scale[i] * scale[j]);
    if (Math.min(...new EigenvalueDecomposition(S).realEigenvalues) > 0.05) break;
    shrink *= 0.8;
    Bc = D.clone().add(B.clone().sub(D).mul(shrink));
  }
  const Barr = Bc.to2DArray();
  const landShare = 0.85;
  const cLand = y.map((v) => (landShare * v) / BASE_LAND_HA);
  const eTrend = others.map((it, i) => signOf(it) * it.trendShare * Math.abs(y[i]));
  const a = y.map((v, i) => v - Barr[i].reduce((s, b, j) => s + b * pt[j], 0) - cLand[i] * BASE_LAND_HA - eTrend[i] * MID_TREND);
  const yn = -num.baseQuantity;
  const quad = 0.5 * pt.reduce((s, pi, i) => s + pi * Barr[i].reduce((t, b, j) => t + b * pt[j], 0), 0);
  const dLand = (landShare * yn) / BASE_LAND_HA;
  const dTrend = -num.trendShare * num.baseQuantity;
  const a0 = yn + quad - dLand * BASE_LAND_HA - dTrend * MID_TREND;
  return { codes: others.map((o) => o.code), B: Barr, a, cLand, eTrend, a0, dLand, dTrend };
}

/** Netputs (outputs +, inputs −) of every item, numeraire last, at prices (EUR per unit), land and trend. */
export function netputs(tech: Technology, prices: Record<string, number>, landHa: number, trend: number): Record<string, number> {
  const pn = prices[NUMERAIRE];
  const pt = tech.codes.map((c) => prices[c] / pn);
  const out: Record<string, number> = {};
  tech.codes.forEach((c, i) => {
    out[c] = tech.a[i] + tech.B[i].reduce((s, b, j) => s + b * pt[j], 0) + tech.cLand[i] * landHa + tech.eTrend[i] * trend;
  });
  const quad = 0.5 * pt.reduce((s, pi, i) => s + pi * tech.B[i].reduce((t, b, j) => t + b * pt[j], 0), 0);
  out[NUMERAIRE] = tech.a0 - quad + tech.dLand * landHa + tech.dTrend * trend;
  return out;
}
