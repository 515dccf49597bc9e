/**
 * What a functional form must provide, and the form-independent pieces built on it: netputs,
 * profit and fixed-factor derivatives all follow from one decomposition of the netput equations,
 *   y_i(p, z) = κ_i(p) + Σ_k λ_ik(p) z_k + ½ z' Q_i(p) z,
 * and from Euler's theorem for a profit function homogeneous of degree one in prices,
 *   π = Σ_i p_i y_i,  ∂π/∂z = Σ_i p_i ∂y_i/∂z.
 */
import type { NetputItem } from './dataset.js';
import type { Mat } from './linalg.js';
import type { SurEquationInput } from './sur.js';

import type { FormName, ModelLayout } from '../../shared/estimation-types.js';

export type { FormName, ModelLayout } from '../../shared/estimation-types.js';

export interface NetputDecomposition {
  constant: number[];
  /** linear[i][k] = λ_ik. */
  linear: Mat;
  /** quadratic[i] = Q_i (m×m, symmetric; rows and columns of the trend are zero). */
  quadratic: Mat[];
}

/** Data columns for building equations, in layout order. */
export interface ModelData {
  prices: Float64Array[];
  netputs: Float64Array[];
  factors: Float64Array[];
  T: number;
}

/**
 * A linear reparameterisation of the parameters that decide convexity: the (n−1)×(n−1) leading
 * block C of D·H·D, with H the price Hessian at the reference prices and D a positive diagonal
 * scaling. Because H·p = 0 with p_n > 0, H is positive semidefinite exactly when C is.
 */
export interface CurvatureBlock {
  /** Indices into θ of the parameters that C determines (as many as C has distinct entries). */
  indices: number[];
  size: number;
  /** True when convexity of C at one point means convexity everywhere (NQ). */
  global: boolean;
  toMatrix(theta: ArrayLike<number>): Mat;
  /** Values for `indices` that give C (linear in C). */
  fromMatrix(c: Mat): number[];
}

export interface ProfitForm {
  name: FormName;
  parameterNames(items: NetputItem[], factors: string[], quadraticFactors: number): string[];
  decompose(layout: ModelLayout, theta: ArrayLike<number>, prices: ArrayLike<number>): NetputDecomposition;
  /** ∂²π/∂p∂p' (n×n); for both forms it does not depend on z. */
  priceHessian(layout: ModelLayout, theta: ArrayLike<number>, prices: ArrayLike<number>): Mat;
  /** The estimating equations (one per item, layout order) and, per regressor, the θ index it carries. */
  equations(layout: ModelLayout, data: ModelData): { equations: SurEquationInput[]; slots: number[][] };
  curvatureBlock(layout: ModelLayout, referencePrices: ArrayLike<number>): CurvatureBlock;
}

/** Fitted netputs y(p, z): outputs positive, inputs negative. */
export function netputsFromDecomposition(d: NetputDecomposition, z: ArrayLike<number>): number[] {
  return d.constant.map((c, i) => {
    let y = c;
    const lin = d.linear[i]!;
    for (let k = 0; k < z.length; k++) y += lin[k]! * z[k]!;
    const Q = d.quadratic[i]!;
    for (let k = 0; k < z.length; k++) for (let l = 0; l < z.length; l++) y += 0.5 * Q[k]![l]! * z[k]! * z[l]!;
    return y;
  });
}

/** ∂y_i/∂z_k (n×m). */
export function netputFactorDerivatives(d: NetputDecomposition, z: ArrayLike<number>): Mat {
  return d.constant.map((_, i) =>
    d.linear[i]!.map((lik, k) => {
      let v = lik;
      for (let l = 0; l < z.length; l++) v += d.quadratic[i]![k]![l]! * z[l]!;
      return v;
    }),
  );
}

export function profitFromNetputs(prices: ArrayLike<number>, y: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < y.length; i++) s += prices[i]! * y[i]!;
  return s;
}

/** ∂π/∂z_k = Σ_i p_i ∂y_i/∂z_k: the shadow value of each fixed factor. */
export function factorGradient(d: NetputDecomposition, prices: ArrayLike<number>, z: ArrayLike<number>): number[] {
  const dy = netputFactorDerivatives(d, z);
  return z.length ? Array.from({ length: z.length }, (_, k) => dy.reduce((s, row, i) => s + prices[i]! * row[k]!, 0)) : [];
}

/** ∂²π/∂z∂z' = Σ_i p_i Q_i. */
export function factorHessian(d: NetputDecomposition, prices: ArrayLike<number>): Mat {
  const m = d.linear[0]?.length ?? 0;
  return Array.from({ length: m }, (_, k) => Array.from({ length: m }, (_, l) => d.quadratic.reduce((s, Q, i) => s + prices[i]! * Q[k]![l]!, 0)));
}

/** A data column of length T from its values by index (a plain loop; Float64Array.from with a map function is slow on long panels). */
export function column(T: number, f: (t: number) => number): Float64Array {
  const out = new Float64Array(T);
  for (let t = 0; t < T; t++) out[t] = f(t);
  return out;
}
