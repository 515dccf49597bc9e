/**
 * Ordinary least squares by Householder QR on centred and scaled regressors, the numerically
 * careful core used where a single equation is fitted (and checked against NIST StRD Longley).
 */
import { Matrix, QrDecomposition } from 'ml-matrix';
import { zeros, type Mat } from './linalg.js';

export interface OlsResult {
  /** Intercept first (when fitted), then one per regressor column. */
  coefficients: number[];
  standardErrors: number[];
  covariance: Mat;
  residuals: number[];
  rss: number;
  /** Residual standard deviation √(RSS / (n − p)). */
  residualStandardDeviation: number;
  /** Centred R² when an intercept is fitted, uncentred otherwise. */
  r2: number;
  df: number;
}

/**
 * Fit y = b0 + Σ b_j x_j + e by QR. Columns are centred (when an intercept is fitted) and scaled
 * to unit length before the decomposition, which keeps ill-conditioned designs such as Longley's
 * (regressors around 1e5 with a year column) accurate to about 1e-10.
 * @param columns regressor columns (without the intercept), each of length n
 * @throws Error when the design is rank deficient
 */
export function ols(columns: ArrayLike<number>[], y: ArrayLike<number>, options: { intercept?: boolean } = {}): OlsResult {
  const intercept = options.intercept ?? true;
  const n = y.length;
  const k = columns.length;
  const p = k + (intercept ? 1 : 0);
  if (n <= p) throw new Error(`ols: ${n} observations for ${p} coefficients`);
  const means = columns.map((c) => (intercept ? mean(c) : 0));
  const yMean = intercept ? mean(y) : 0;
  const scales: number[] = [];
  const xs = zeros(n, k);
  for (let j = 0; j < k; j++) {
    const c = columns[j]!;
    let ss = 0;
    for (let i = 0; i < n; i++) {
      const v = c[i]! - means[j]!;
      xs[i]![j] = v;
      ss += v * v;
    }
    const s = Math.sqrt(ss);
    if (!(s > 0)) throw new Error(`ols: column ${j + 1} is constant`);
    scales.push(s);
    for (let i = 0; i < n; i++) xs[i]![j]! /= s;
  }
  const yc = Array.from(y, (v) => v - yMean);
  let b: number[] = [];
  let rInv: Mat = [];
  if (k > 0) {
    const qr = new QrDecomposition(new Matrix(xs));
    if (!qr.isFullRank()) throw new Error('ols: the regressors are linearly dependent');
    b = qr.solve(Matrix.columnVector(yc)).to1DArray();
    rInv = upperInverse(qr.upperTriangularMatrix.to2DArray());
  }
  const residuals = new Array<number>(n);
  let rss = 0;
  let tss = 0;
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < k; j++) f += xs[i]![j]! * b[j]!;
    const e = yc[i]! - f;
    residuals[i] = e;
    rss += e * e;
    tss += yc[i]! * yc[i]!;
  }
  const df = n - p;
  const s2 = rss / df;
  // Cov of the scaled slopes is s² R⁻¹ R⁻ᵀ.
  const covScaled = zeros(k, k);
  for (let i = 0; i < k; i++)
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = Math.max(i, j); l < k; l++) s += rInv[i]![l]! * rInv[j]![l]!;
      covScaled[i]![j] = s2 * s;
    }
  const slopes = b.map((v, j) => v / scales[j]!);
  const covSlopes = covScaled.map((row, i) => row.map((v, j) => v / (scales[i]! * scales[j]!)));
  let coefficients: number[];
  let covariance: Mat;
  if (intercept) {
    const b0 = yMean - slopes.reduce((s, v, j) => s + v * means[j]!, 0);
    const cm = covSlopes.map((row) => row.reduce((s, v, j) => s + v * means[j]!, 0));
    const var0 = s2 / n + cm.reduce((s, v, j) => s + v * means[j]!, 0);
    covariance = zeros(p, p);
    covariance[0]![0] = var0;
    for (let i = 0; i < k; i++) {
      covariance[0]![i + 1] = -cm[i]!;
      covariance[i + 1]![0] = -cm[i]!;
      for (let j = 0; j < k; j++) covariance[i + 1]![j + 1] = covSlopes[i]![j]!;
    }
    coefficients = [b0, ...slopes];
  } else {
    covariance = covSlopes;
    coefficients = slopes;
  }
  return {
    coefficients,
    standardErrors: covariance.map((row, i) => Math.sqrt(row[i]!)),
    covariance,
    residuals,
    rss,
    residualStandardDeviation: Math.sqrt(s2),
    r2: 1 - rss / tss,
    df,
  };
}

function mean(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]!;
  return s / v.length;
}

function upperInverse(r: Mat): Mat {
  const k = r.length;
  const inv = zeros(k, k);
  for (let j = 0; j < k; j++) {
    inv[j]![j] = 1 / r[j]![j]!;
    for (let i = j - 1; i >= 0; i--) {
      let s = 0;
      for (let l = i + 1; l <= j; l++) s += r[i]![l]! * inv[l]![j]!;
      inv[i]![j] = -s / r[i]![i]!;
    }
  }
  return inv;
}
