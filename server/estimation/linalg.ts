/**
 * Small dense linear-algebra helpers on plain arrays (number[][]), built on ml-matrix.
 * Plain arrays keep every result serialisable.
 */
import { CholeskyDecomposition, EigenvalueDecomposition, LuDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';

export type Mat = number[][];

export function zeros(rows: number, cols: number): Mat {
  return Array.from({ length: rows }, () => new Array<number>(cols).fill(0));
}

export function identity(n: number): Mat {
  const m = zeros(n, n);
  for (let i = 0; i < n; i++) m[i]![i] = 1;
  return m;
}

export function transpose(a: Mat): Mat {
  const r = a.length;
  const c = r ? a[0]!.length : 0;
  const t = zeros(c, r);
  for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) t[j]![i] = a[i]![j]!;
  return t;
}

export function matMul(a: Mat, b: Mat): Mat {
  const n = a.length;
  const k = b.length;
  const m = k ? b[0]!.length : 0;
  const out = zeros(n, m);
  for (let i = 0; i < n; i++) {
    const ai = a[i]!;
    const oi = out[i]!;
    for (let l = 0; l < k; l++) {
      const v = ai[l]!;
      if (v === 0) continue;
      const bl = b[l]!;
      for (let j = 0; j < m; j++) oi[j]! += v * bl[j]!;
    }
  }
  return out;
}

export function matVec(a: Mat, x: ArrayLike<number>): number[] {
  return a.map((row) => {
    let s = 0;
    for (let j = 0; j < row.length; j++) s += row[j]! * x[j]!;
    return s;
  });
}

/** a' b for vectors. */
export function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}

/** Arithmetic mean of a vector. */
export function mean(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]!;
  return s / v.length;
}

/** J V J' (the delta-method sandwich). */
export function sandwich(j: Mat, v: Mat): Mat {
  return matMul(matMul(j, v), transpose(j));
}

export function symmetrize(a: Mat): Mat {
  const n = a.length;
  const out = zeros(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i]![j] = 0.5 * (a[i]![j]! + a[j]![i]!);
  return out;
}

/** Solve A x = b for a square A by LU with partial pivoting. Throws on a singular A. */
export function solve(a: Mat, b: ArrayLike<number>): number[] {
  const lu = new LuDecomposition(new Matrix(a));
  if (lu.isSingular()) throw new Error('singular matrix');
  return lu.solve(Matrix.columnVector(Array.from(b))).to1DArray();
}

/** Inverse of a square matrix by LU. Throws on a singular matrix. */
export function inverse(a: Mat): Mat {
  const lu = new LuDecomposition(new Matrix(a));
  if (lu.isSingular()) throw new Error('singular matrix');
  return lu.solve(Matrix.eye(a.length)).to2DArray();
}

/** Eigen-decomposition of a symmetric matrix; eigenvalues ascending, eigenvectors as columns. */
export function symmetricEigen(a: Mat): { values: number[]; vectors: Mat } {
  const n = a.length;
  if (n === 0) return { values: [], vectors: [] };
  const evd = new EigenvalueDecomposition(new Matrix(symmetrize(a)), { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  const vecs = evd.eigenvectorMatrix.to2DArray();
  const order = values.map((_, i) => i).sort((i, j) => values[i]! - values[j]!);
  return {
    values: order.map((i) => values[i]!),
    vectors: vecs.map((row) => order.map((i) => row[i]!)),
  };
}

/**
 * Eigenvalues of a small symmetric matrix by cyclic Jacobi rotations, ascending. Used in hot loops
 * (one curvature check per Monte Carlo draw) where building ml-matrix objects would dominate.
 */
export function jacobiEigenvalues(input: Mat): number[] {
  const n = input.length;
  const a = input.map((r) => r.slice());
  for (let sweep = 0; sweep < 60; sweep++) {
    let off = 0;
    let scale = 0;
    for (let i = 0; i < n; i++) {
      scale += a[i]![i]! * a[i]![i]!;
      for (let j = i + 1; j < n; j++) off += a[i]![j]! * a[i]![j]!;
    }
    if (off <= 1e-30 * (scale + off) || off === 0) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p]![q]!;
        if (apq === 0) continue;
        const app = a[p]![p]!;
        const aqq = a[q]![q]!;
        const theta = (aqq - app) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k]![p]!;
          const akq = a[k]![q]!;
          a[k]![p] = c * akp - s * akq;
          a[k]![q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p]![k]!;
          const aqk = a[q]![k]!;
          a[p]![k] = c * apk - s * aqk;
          a[q]![k] = s * apk + c * aqk;
        }
      }
    }
  }
  return a.map((r, i) => r[i]!).sort((x, y) => x - y);
}

/** Lower Cholesky factor of a symmetric positive definite matrix, or null if it is not. */
export function choleskyLower(a: Mat): Mat | null {
  const ch = new CholeskyDecomposition(new Matrix(symmetrize(a)));
  if (!ch.isPositiveDefinite()) return null;
  return ch.lowerTriangularMatrix.to2DArray();
}

/**
 * A factor C with C C' = A for a symmetric positive semidefinite A (eigenvalue square roots;
 * tiny negative eigenvalues from rounding are set to zero). Works for singular covariance
 * matrices, such as those of estimates on a boundary.
 */
export function psdFactor(a: Mat): Mat {
  const { values, vectors } = symmetricEigen(a);
  const n = a.length;
  const out = zeros(n, n);
  for (let j = 0; j < n; j++) {
    const s = Math.sqrt(Math.max(values[j]!, 0));
    for (let i = 0; i < n; i++) out[i]![j] = vectors[i]![j]! * s;
  }
  return out;
}

/** Moore–Penrose inverse of a symmetric matrix, dropping eigenvalues below tol·max|λ|. */
export function pinvSymmetric(a: Mat, tol = 1e-12): { inverse: Mat; rank: number } {
  const { values, vectors } = symmetricEigen(a);
  const n = a.length;
  const maxAbs = Math.max(...values.map(Math.abs), 0);
  const out = zeros(n, n);
  let rank = 0;
  for (let k = 0; k < n; k++) {
    const l = values[k]!;
    if (Math.abs(l) <= tol * maxAbs || l === 0) continue;
    rank++;
    for (let i = 0; i < n; i++) {
      const vik = vectors[i]![k]! / l;
      for (let j = 0; j < n; j++) out[i]![j]! += vik * vectors[j]![k]!;
    }
  }
  return { inverse: out, rank };
}

/** Numerical rank by SVD with the usual tolerance max(m,n)·ε·σ_max. */
export function rank(a: Mat): number {
  if (!a.length) return 0;
  const svd = new SingularValueDecomposition(new Matrix(a), { autoTranspose: true });
  return svd.rank;
}

export function logDetSymmetricPD(a: Mat): number {
  const l = choleskyLower(a);
  if (!l) throw new Error('matrix is not positive definite');
  let s = 0;
  for (let i = 0; i < a.length; i++) s += Math.log(l[i]![i]!);
  return 2 * s;
}

export function covarianceToCorrelation(s: Mat): Mat {
  const n = s.length;
  const out = zeros(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i]![j] = s[i]![j]! / Math.sqrt(s[i]![i]! * s[j]![j]!);
  return out;
}
