/**
 * Convexity in prices: checking it, and imposing it by a Cholesky reparameterisation C = L L'
 * (Wiley, Schmidt & Bramble 1973; Lau 1978) of the block of parameters that decides it, solved
 * as nonlinear SUR with ml-levenberg-marquardt (docs/profit-functions.md §5, §7).
 *
 * With Σ̂ fixed the SUR objective in the structural parameters θ is the quadratic
 *   (y − X S θ)'(Σ̂⁻¹ ⊗ I)(y − X S θ) = ‖U (θ − θ̂_Σ)‖² + const,   U'U = S'X'(Σ̂⁻¹⊗I)X S,
 * where θ̂_Σ is the (symmetry-restricted) GLS estimate for that Σ̂. So each Σ̂ step minimises
 * ‖U(θ(ψ) − θ̂_Σ)‖² over ψ (the same objective as the whitened stacked residuals, on K instead of
 * n·T points); Σ̂ is then re-estimated from the residuals and the two steps alternate until the
 * relative change of θ is below the tolerance, converging to the Gaussian ML estimate under
 * convexity.
 */
import type { OptimalityCheck } from '../../shared/estimation-types.js';
import { choleskyLower, jacobiEigenvalues, matMul, pinvSymmetric, solve, symmetricEigen, transpose, zeros, type Mat } from './linalg.js';
import { fitLeastSquares } from './lm.js';
import type { CurvatureBlock } from './model.js';
import { systemCrossProducts, type SurEquationInput } from './sur.js';

export interface ConvexityCheck {
  /** Eigenvalues of the curvature block C (ascending). */
  eigenvalues: number[];
  minEigenvalue: number;
  convex: boolean;
}

/** Relative tolerance on eigenvalues: convex when λ_min ≥ −tol·max|λ| (documented choice). */
export const CONVEXITY_TOLERANCE = 1e-9;

export function checkConvexity(c: Mat): ConvexityCheck {
  const eigenvalues = c.length ? jacobiEigenvalues(c) : [];
  const maxAbs = eigenvalues.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
  const minEigenvalue = eigenvalues.length ? eigenvalues[0]! : 0;
  return { eigenvalues, minEigenvalue, convex: minEigenvalue >= -CONVEXITY_TOLERANCE * maxAbs };
}

/** Leading (n−1)×(n−1) block of a price Hessian with H·p = 0: PSD exactly when H is. */
export function leadingBlock(h: Mat): Mat {
  const k = h.length - 1;
  return h.slice(0, k).map((row) => row.slice(0, k));
}

export interface ImposedFit {
  theta: number[];
  covariance: Mat;
  /** Σ̂ used in the last step (divisor T). */
  sigmaUsed: Mat;
  iterations: number;
  converged: boolean;
  /** True when C ends on the boundary (a zero eigenvalue): the constraint binds. */
  binding: boolean;
  /** Rank of the fitted C. */
  rank: number;
  /** Rank of the coefficient covariance (below the parameter count on the boundary). */
  covarianceRank: number;
  /** First-order (KKT) conditions of min ‖U(θ − θ̂)‖² s.t. C ⪰ 0 at the last Σ̂. */
  optimality: OptimalityCheck;
}

export type { OptimalityCheck } from '../../shared/estimation-types.js';

export interface ImposeArgs {
  equations: SurEquationInput[];
  /** slots[i][r] = θ index carried by regressor r of equation i. */
  slots: number[][];
  parameterCount: number;
  /** Unrestricted (symmetry-only) estimate, the start. */
  theta0: number[];
  sigma0: Mat;
  block: CurvatureBlock;
  maxIterations: number;
  tolerance: number;
}

export function imposeConvexity(args: ImposeArgs): ImposedFit {
  const { equations, slots, parameterCount: k, block } = args;
  const nEq = equations.length;
  const T = equations[0]!.y.length;
  const { xx, xy } = systemCrossProducts(equations);
  const bi = block.indices;
  const nb = bi.length;
  const size = block.size;
  const inBlock = new Map<number, number>(bi.map((g, e) => [g, e]));
  const nonBlock = [...Array(k).keys()].filter((j) => !inBlock.has(j));

  const thetaGls = (sigmaInv: Mat): { A: Mat; b: number[] } => {
    const A = zeros(k, k);
    const b = new Array<number>(k).fill(0);
    for (let i = 0; i < nEq; i++)
      for (let j = 0; j < nEq; j++) {
        const w = sigmaInv[i]![j]!;
        const blk = xx[i]![j]!;
        const si = slots[i]!;
        const sj = slots[j]!;
        for (let r = 0; r < si.length; r++) {
          const Ar = A[si[r]!]!;
          const br = blk[r]!;
          for (let c = 0; c < sj.length; c++) Ar[sj[c]!]! += w * br[c]!;
          b[si[r]!]! += w * xy[i]![j]![r]!;
        }
      }
    return { A, b };
  };
  const residualSigma = (theta: number[]): Mat => {
    const res = equations.map((eq, i) => {
      const e = Float64Array.from(eq.y as ArrayLike<number>);
      eq.regressors.forEach((reg, r) => {
        const beta = theta[slots[i]![r]!]!;
        for (let t = 0; t < T; t++) e[t]! -= beta * reg.values[t]!;
      });
      return e;
    });
    const S = zeros(nEq, nEq);
    for (let i = 0; i < nEq; i++)
      for (let j = i; j < nEq; j++) {
        let acc = 0;
        for (let t = 0; t < T; t++) acc += res[i]![t]! * res[j]![t]!;
        S[i]![j] = acc / T;
        S[j]![i] = acc / T;
      }
    return S;
  };

  // L patterns: the active columns J of a lower-triangular L, entries (i, j) with j ∈ J, i ≥ j.
  // All columns give C = LL' of full rank; fewer columns give the boundary of rank |J| without
  // the vanishing gradients a full L has there.
  type Pattern = [number, number][];
  const patternFor = (cols: number[]): Pattern => cols.flatMap((j) => Array.from({ length: size - j }, (_, d) => [j + d, j] as [number, number]));
  const lOf = (pattern: Pattern, v: ArrayLike<number>): Mat => {
    const L = zeros(size, size);
    pattern.forEach(([a, c], e) => (L[a]![c] = v[e]!));
    return L;
  };
  const blockOf = (pattern: Pattern, v: ArrayLike<number>): number[] => {
    const L = lOf(pattern, v);
    return block.fromMatrix(matMul(L, transpose(L)));
  };
  /** ∂θ_block/∂v (nb × |pattern|). */
  const blockJac = (pattern: Pattern, v: ArrayLike<number>): Mat => {
    const L = lOf(pattern, v);
    const cols = pattern.map(([a, c]) => {
      const dC = zeros(size, size);
      for (let j = 0; j < size; j++) {
        dC[a]![j]! += L[j]![c]!;
        dC[j]![a]! += L[j]![c]!;
      }
      return block.fromMatrix(dC);
    });
    return Array.from({ length: nb }, (_, r) => cols.map((col) => col[r]!));
  };
  /** Semidefinite Cholesky without pivoting: columns with a pivot below tol are dropped. */
  const psdCholesky = (C: Mat, tol: number): { L: Mat; cols: number[] } => {
    const L = zeros(size, size);
    const cols: number[] = [];
    const scale = Math.max(...C.map((r, i) => Math.abs(r[i]!)), 1e-300);
    for (let j = 0; j < size; j++) {
      let d = C[j]![j]!;
      for (let c = 0; c < j; c++) d -= L[j]![c]! ** 2;
      if (d <= tol * scale) continue;
      const ljj = Math.sqrt(d);
      L[j]![j] = ljj;
      for (let i = j + 1; i < size; i++) {
        let acc = C[i]![j]!;
        for (let c = 0; c < j; c++) acc -= L[i]![c]! * L[j]![c]!;
        L[i]![j] = acc / ljj;
      }
      cols.push(j);
    }
    return { L, cols };
  };
  const truncate = (C: Mat, rank: number, floor: number): Mat => {
    const { values, vectors } = symmetricEigen(C);
    const kept = values.map((v, i) => (i >= size - rank ? Math.max(v, floor) : 0));
    return Array.from({ length: size }, (_, a) =>
      Array.from({ length: size }, (_, c) => kept.reduce((acc, lam, l) => acc + vectors[a]![l]! * lam * vectors[c]![l]!, 0)),
    );
  };

  /** min over C ⪰ 0 of (θ_b(C) − θ̂_b)' M (θ_b(C) − θ̂_b), by LM on the L entries, several patterns. */
  const solveBlock = (M: Mat, thetaHatB: number[], startC: Mat): { thetaB: number[]; pattern: Pattern; v: number[] } => {
    const Lm = choleskyLower(M);
    if (!Lm) throw new Error('curvature: the concentrated normal matrix is not positive definite');
    const U = transpose(Lm);
    const target = matVecDense(U, thetaHatB);
    const objective = (tb: number[]): number => {
      const r = matVecDense(U, tb);
      let acc = 0;
      for (let i = 0; i < r.length; i++) acc += (r[i]! - target[i]!) ** 2;
      return acc;
    };
    const run = (pattern: Pattern, start: number[]): { v: number[]; obj: number } => {
      const model = (v: number[]): Float64Array => matVecDense(U, blockOf(pattern, v));
      const jac = (v: number[]): Mat => matMul(U, blockJac(pattern, v));
      let best = start;
      let bestObj = objective(blockOf(pattern, start));
      for (let round = 0; round < 8; round++) {
        const J0 = jac(best);
        const scales = pattern.map((_, j) => {
          let ss = 0;
          for (const row of J0) ss += row[j]! ** 2;
          return ss > 0 ? 1 / Math.sqrt(ss) : 1;
        });
        const fit = fitLeastSquares({ target, model, jacobian: jac }, best, { damping: 1e-2, maxIterations: 200, errorTolerance: 0, scales });
        if (fit.rss < bestObj * (1 - 1e-13)) {
          best = fit.parameters;
          bestObj = fit.rss;
        } else break;
      }
      return { v: best, obj: bestObj };
    };
    const { values } = symmetricEigen(startC);
    const maxAbs = Math.max(...values.map(Math.abs), 1e-300);
    const candidates: { pattern: Pattern; v: number[]; obj: number }[] = [];
    const tryFrom = (C: Mat, tol: number): void => {
      const { L, cols } = psdCholesky(C, tol);
      const pattern = patternFor(cols);
      const r = run(
        pattern,
        pattern.map(([a, c]) => L[a]![c]!),
      );
      candidates.push({ pattern, ...r });
    };
    // full rank from the clipped start, then the ranks suggested by the start and by that fit
    tryFrom(truncate(startC, size, 1e-6 * maxAbs), 0);
    const ranks = new Set<number>();
    ranks.add(values.filter((v) => v > 1e-8 * maxAbs).length);
    const fullC = matMul(lOf(candidates[0]!.pattern, candidates[0]!.v), transpose(lOf(candidates[0]!.pattern, candidates[0]!.v)));
    const fv = symmetricEigen(fullC).values;
    const fmax = Math.max(...fv.map(Math.abs), 1e-300);
    ranks.add(fv.filter((v) => v > 1e-4 * fmax).length);
    for (const r of ranks) if (r < size && r > 0) tryFrom(truncate(r === ranks.values().next().value ? startC : fullC, r, 0), 1e-10);
    if (ranks.has(0)) candidates.push({ pattern: [], v: [], obj: objective(blockOf([], [])) });
    const best = candidates.reduce((a, c) => (c.obj < a.obj ? c : a));
    return { thetaB: blockOf(best.pattern, best.v), pattern: best.pattern, v: best.v };
  };

  let sigma = args.sigma0;
  let theta = args.theta0.slice();
  let C = block.toMatrix(theta);
  let iterations = 0;
  let converged = false;
  let last: { A: Mat; thetaHat: number[]; pattern: Pattern; v: number[] } | null = null;
  while (iterations < args.maxIterations) {
    iterations++;
    const { A, b } = thetaGls(invertSym(sigma));
    const thetaHat = solve(A, b);
    // Concentrate the parameters outside C out of the quadratic objective (Schur complement).
    const Ann = nonBlock.map((a) => nonBlock.map((c) => A[a]![c]!));
    const Anb = nonBlock.map((a) => bi.map((c) => A[a]![c]!));
    const AnnInvAnb = nonBlock.length ? transpose(bi.map((_, e) => solve(Ann, Anb.map((row) => row[e]!)))) : [];
    const M = bi.map((a) => bi.map((c, e) => A[a]![c]! - nonBlock.reduce((acc, n, x) => acc + A[a]![n]! * AnnInvAnb[x]![e]!, 0)));
    const thetaHatB = bi.map((j) => thetaHat[j]!);
    const sol = solveBlock(M, thetaHatB, C);
    const next = thetaHat.slice();
    bi.forEach((j, e) => (next[j] = sol.thetaB[e]!));
    nonBlock.forEach((j, x) => {
      let adj = 0;
      for (let e = 0; e < nb; e++) adj += AnnInvAnb[x]![e]! * (sol.thetaB[e]! - thetaHatB[e]!);
      next[j] = thetaHat[j]! - adj;
    });
    let num = 0;
    let den = 0;
    for (let j = 0; j < k; j++) {
      num += (next[j]! - theta[j]!) ** 2;
      den += theta[j]! ** 2;
    }
    theta = next;
    C = block.toMatrix(theta);
    last = { A, thetaHat, pattern: sol.pattern, v: sol.v };
    if (iterations > 1 && Math.sqrt(num / den) <= args.tolerance) {
      converged = true;
      break;
    }
    sigma = residualSigma(theta);
  }
  const { A, thetaHat, pattern, v } = last!;
  // Covariance: (J'J)⁻¹ in ψ = (L entries of the pattern, parameters outside C), pseudo-inverse
  // on the boundary, mapped to θ by the delta method.
  const Jb = blockJac(pattern, v);
  const q = pattern.length + nonBlock.length;
  const G = zeros(k, q);
  bi.forEach((j, r) => pattern.forEach((_, c) => (G[j]![c] = Jb[r]![c]!)));
  nonBlock.forEach((j, x) => (G[j]![pattern.length + x] = 1));
  const JtJ = matMul(transpose(G), matMul(A, G));
  // Equilibrate before the pseudo-inverse so that its cut-off is not driven by parameter units.
  const dsc = JtJ.map((row, i) => (row[i]! > 0 ? 1 / Math.sqrt(row[i]!) : 1));
  const scaled = JtJ.map((row, i) => row.map((val, j) => val * dsc[i]! * dsc[j]!));
  const { inverse: Vs, rank: covarianceRank } = pinvSymmetric(scaled, 1e-10);
  const Vpsi = Vs.map((row, i) => row.map((val, j) => val * dsc[i]! * dsc[j]!));
  const covariance = matMul(G, matMul(Vpsi, transpose(G)));
  const optimality = kktCheck(A, thetaHat, theta, block, inBlock);
  const cCheck = checkConvexity(C);
  const maxEig = Math.max(...cCheck.eigenvalues.map(Math.abs), 0);
  const rank = cCheck.eigenvalues.filter((val) => val > 1e-6 * maxEig).length;
  return {
    theta,
    covariance,
    sigmaUsed: sigma,
    iterations,
    converged,
    binding: rank < size,
    rank,
    covarianceRank,
    optimality,
  };
}

function kktCheck(A: Mat, thetaHat: number[], theta: number[], block: CurvatureBlock, inBlock: Map<number, number>): OptimalityCheck {
  const k = theta.length;
  const diff = theta.map((v, j) => v - thetaHat[j]!);
  const g = A.map((row) => 2 * row.reduce((s, v, j) => s + v * diff[j]!, 0));
  const { inverse: Ainv } = pinvSymmetric(A, 1e-14);
  let stationarity = 0;
  for (let j = 0; j < k; j++) if (!inBlock.has(j)) stationarity = Math.max(stationarity, Math.abs(g[j]!) * Math.sqrt(Math.max(Ainv[j]![j]!, 0)));
  const size = block.size;
  const gb = block.indices.map((j) => g[j]!);
  const df = (dC: Mat): number => block.fromMatrix(dC).reduce((s, v, e) => s + v * gb[e]!, 0);
  const Lam = zeros(size, size);
  for (let a = 0; a < size; a++)
    for (let c = a; c < size; c++) {
      const dC = zeros(size, size);
      dC[a]![c] = 1;
      dC[c]![a] = 1;
      // dC = E_ac + E_ca gives df = tr(Λ dC) = 2Λ_ac; for a = c, dC = E_aa gives Λ_aa.
      const v = a === c ? df(dC) : df(dC) / 2;
      Lam[a]![c] = v;
      Lam[c]![a] = v;
    }
  const lamEig = jacobiEigenvalues(Lam);
  const lamMax = Math.max(...lamEig.map(Math.abs), 1e-300);
  const C = block.toMatrix(theta);
  let tr = 0;
  let nl = 0;
  let nc = 0;
  for (let a = 0; a < size; a++)
    for (let c = 0; c < size; c++) {
      tr += Lam[a]![c]! * C[a]![c]!;
      nl += Lam[a]![c]! ** 2;
      nc += C[a]![c]! ** 2;
    }
  return {
    stationarity,
    dualMinEigenvalue: lamEig[0]! / lamMax,
    complementarity: nl > 0 && nc > 0 ? tr / Math.sqrt(nl * nc) : 0,
  };
}

function invertSym(s: Mat): Mat {
  const L = choleskyLower(s);
  if (!L) throw new Error('curvature: residual covariance is not positive definite');
  const n = s.length;
  const out = zeros(n, n);
  for (let j = 0; j < n; j++) {
    const e = new Array<number>(n).fill(0);
    e[j] = 1;
    const col = solve(s, e);
    for (let i = 0; i < n; i++) out[i]![j] = col[i]!;
  }
  return out;
}

function matVecDense(a: Mat, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) {
    const row = a[i]!;
    let s = 0;
    for (let j = 0; j < row.length; j++) s += row[j]! * x[j]!;
    out[i] = s;
  }
  return out;
}
