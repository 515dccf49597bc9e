/**
 * Convexity in prices: checking it, and imposing it by maximum likelihood subject to a positive
 * semidefinite curvature block C (docs/profit-functions.md §7.2–7.3). C ⪰ 0 is the
 * condition that B = L L′ for some L (Lau 1978; Diewert & Wales 1987); the optimum is often on the
 * boundary, with C of reduced rank, and the solver below reaches it there too and checks the
 * Karush–Kuhn–Tucker conditions at the end.
 */
import type { OptimalityCheck } from '../../shared/estimation-types.js';
import { jacobiEigenvalues, matMul, pinvSymmetric, symmetricEigen, zeros, type Mat } from './linalg.js';
import type { CurvatureBlock } from './model.js';
import { systemCrossProducts, systemResiduals, type SurEquationInput } from './sur.js';

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

/**
 * Whether the first-order (Karush–Kuhn–Tucker) conditions hold: every measure within this, in
 * log-likelihood units per standard error (see OptimalityCheck). A measure of 1e-6 means that a
 * move of one standard error in the worst direction changes the log-likelihood by about 1e-6 at
 * first order, so what a further step could gain is of order 1e-12.
 */
export const KKT_TOLERANCE = 1e-6;

export interface ImposedFit {
  theta: number[];
  covariance: Mat;
  /** Σ̂ used in the last step (divisor T). */
  sigmaUsed: Mat;
  iterations: number;
  /** The iterations settled and the optimality conditions hold (`optimality.satisfied`). */
  converged: boolean;
  /** True when C ends on the boundary (a zero eigenvalue): the constraint binds. */
  binding: boolean;
  /** Rank of the fitted C. */
  rank: number;
  /** Rank of the coefficient covariance (below the parameter count on the boundary). */
  covarianceRank: number;
  /**
   * First-order (KKT) conditions of the constrained maximum likelihood problem at the returned θ:
   * min f(θ) = −ℓ(θ) (Σ̂ concentrated out) subject to C(θ) ⪰ 0.
   */
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

/** One entry (row, column, value) of a basis matrix of C. */
type Entry = [number, number, number];

/**
 * Maximum likelihood of the netput system subject to C ⪰ 0 (docs/profit-functions.md §7.2–7.3).
 *
 * With Σ̂ fixed the Gaussian objective in θ is the quadratic (θ − θ̂_Σ)'A(θ − θ̂_Σ) + const, with
 * A = S'X'(Σ̂⁻¹⊗I)X S and θ̂_Σ the symmetry-restricted GLS estimate. The parameters outside C are
 * concentrated out (Schur complement), leaving a convex quadratic in C over the cone of positive
 * semidefinite matrices; it is solved to its global minimum by a log-barrier (interior point)
 * method and then exactly on the face of the rank it identifies (the reduced-rank form: C = V S V′
 * with V the n−1 × r range and S ⪰ 0). Σ̂ is then re-estimated from the residuals; each of the
 * two steps raises the likelihood, and the alternation stops when θ settles and the KKT
 * conditions of the whole problem hold at the final θ. Every linear solve is guarded
 * (pseudo-inverse when a matrix is singular), so a rank-deficient optimum cannot stop it.
 */
export function imposeConvexity(args: ImposeArgs): ImposedFit {
  const { equations, slots, parameterCount: k, block } = args;
  const nEq = equations.length;
  const T = equations[0]!.y.length;
  const { xx, xy } = systemCrossProducts(equations);
  const bi = block.indices;
  const nb = bi.length;
  const size = block.size;
  const inBlock = new Set<number>(bi);
  const nonBlock = [...Array(k).keys()].filter((j) => !inBlock.has(j));
  // C = Σ_e c_e E_e with c = θ[bi]: the basis matrices, sparse.
  const basis: Entry[][] = bi.map((j) => {
    const th = new Array<number>(k).fill(0);
    th[j] = 1;
    const E = block.toMatrix(th);
    const out: Entry[] = [];
    for (let a = 0; a < size; a++) for (let c = 0; c < size; c++) if (E[a]![c]! !== 0) out.push([a, c, E[a]![c]!]);
    return out;
  });
  const matrixOf = (c: ArrayLike<number>): Mat => {
    const C = zeros(size, size);
    basis.forEach((entries, e) => {
      for (const [a, b, v] of entries) C[a]![b]! += v * c[e]!;
    });
    return C;
  };

  const gls = (sigmaInv: Mat): { A: Mat; b: number[] } => {
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
    const res = systemResiduals(equations, (i, r) => theta[slots[i]![r]!]!);
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

  /** One Σ̂ step: the global minimum of the quadratic over C ⪰ 0 and the implied θ. */
  let warm: Mat | null = null;
  const step = (sigma: Mat): { A: Mat; theta: number[]; rank: number } => {
    const { A, b } = gls(inverseSymmetric(sigma));
    const thetaHat = solveSymmetric(A, b);
    // Concentrate the parameters outside C out of the quadratic (Schur complement).
    const Ann = nonBlock.map((a) => nonBlock.map((c) => A[a]![c]!));
    const AnnInv = inverseSymmetric(Ann);
    const AnnInvAnb = nonBlock.map((_, x) => bi.map((c) => nonBlock.reduce((acc, n, y) => acc + AnnInv[x]![y]! * A[n]![c]!, 0)));
    const M = bi.map((a) => bi.map((c, e) => A[a]![c]! - nonBlock.reduce((acc, n, x) => acc + A[a]![n]! * AnnInvAnb[x]![e]!, 0)));
    const thetaHatB = bi.map((j) => thetaHat[j]!);
    // Warm start: follow the previous solution's face by Newton on C = L L′ (L of its rank); keep
    // it when the KKT conditions of this step's problem hold, else solve from scratch.
    let sol: { c: number[]; rank: number } | null = null;
    if (warm) {
      const face = faceNewton(M, thetaHatB, warm, size, block.fromMatrix);
      if (face?.settled && coneKkt(M, thetaHatB, face.c, basis, size, matrixOf, block.fromMatrix)) sol = face;
    }
    sol ??= coneQuadratic(M, thetaHatB, basis, size, matrixOf, block.fromMatrix);
    warm = factorOf(matrixOf(sol.c), sol.rank);
    const next = thetaHat.slice();
    bi.forEach((j, e) => (next[j] = sol.c[e]!));
    nonBlock.forEach((j, x) => {
      let adj = 0;
      for (let e = 0; e < nb; e++) adj += AnnInvAnb[x]![e]! * (sol.c[e]! - thetaHatB[e]!);
      next[j] = thetaHat[j]! - adj;
    });
    return { A, theta: next, rank: sol.rank };
  };

  /** KKT conditions of min −ℓ(θ) s.t. C ⪰ 0, with Σ̂ = Σ(θ) concentrated out. */
  const optimalityAt = (theta: number[], sigmaTheta: Mat): OptimalityCheck => {
    // ∇(−ℓ) = Σ_t ∂e_t'Σ⁻¹e_t = Aθ − b at Σ = Σ(θ) (half the gradient of the GLS objective).
    const { A, b } = gls(inverseSymmetric(sigmaTheta));
    const g = A.map((row, j) => row.reduce((s, v, c) => s + v * theta[c]!, 0) - b[j]!);
    const Ainv = inverseSymmetric(A);
    let stationarity = 0;
    for (const j of nonBlock) stationarity = Math.max(stationarity, Math.abs(g[j]!) * Math.sqrt(Math.max(Ainv[j]![j]!, 0)));
    const gb = bi.map((j) => g[j]!);
    const Lam = multiplierOf(gb, size, block.fromMatrix);
    // Standard-error units: D = diag(SE of C_aa), Λ̃ = DΛD, C̃ = D⁻¹CD⁻¹.
    const Vb = bi.map((j) => bi.map((l) => Ainv[j]![l]!));
    const D = seDiagonal(Vb, basis, size);
    const C = block.toMatrix(theta);
    const Lt = Lam.map((row, a) => row.map((v, c) => v * D[a]! * D[c]!));
    const Ct = C.map((row, a) => row.map((v, c) => v / (D[a]! * D[c]!)));
    const dual = size ? jacobiEigenvalues(Lt)[0]! : 0;
    const primalEig = size ? jacobiEigenvalues(Ct) : [];
    const normC = Math.sqrt(Ct.reduce((s, row) => s + row.reduce((t, v) => t + v * v, 0), 0));
    const primal = size ? primalEig[0]! / Math.max(1, normC) : 0;
    // Complementarity Λ C = 0 ⟺ Λ L = 0 for C = L L′: the gradient along the face of C's rank,
    // as a Newton decrement √(g_L′ I_L⁺ g_L) with I_L = J′ M J the information of L (M = the
    // Schur complement of A for C's coordinates). Invariant to the units of C.
    const eigC = size ? jacobiEigenvalues(C) : [];
    const r = eigC.filter((v) => v > 1e-9 * Math.max(...eigC.map(Math.abs))).length;
    let complementarity = 0;
    if (r > 0) {
      const J = factorJacobian(factorOf(C, r), size, block.fromMatrix);
      const Mb = inverseSymmetric(Vb);
      const gL = J.map((col) => col.reduce((s, v, e) => s + v * gb[e]!, 0));
      const MJ = J.map((col) => Mb.map((row) => row.reduce((s, v, e) => s + v * col[e]!, 0)));
      const I = J.map((colA) => MJ.map((colB) => colA.reduce((s, v, e) => s + v * colB[e]!, 0)));
      const x = solveSymmetric(I, gL);
      complementarity = Math.sqrt(Math.max(0, gL.reduce((s, v, p) => s + v * x[p]!, 0)));
    }
    const tol = KKT_TOLERANCE;
    return {
      stationarity,
      dualMinEigenvalue: dual,
      complementarity,
      primalMinEigenvalue: primal,
      tolerance: tol,
      satisfied: [stationarity, dual, complementarity, primal].every(Number.isFinite) && stationarity <= tol && dual >= -tol && complementarity <= tol && primal >= -tol,
    };
  };

  interface Run {
    theta: number[];
    sigma: Mat;
    iterations: number;
    converged: boolean;
    optimality: OptimalityCheck;
    A: Mat;
    rank: number;
    /** ln|Σ̂(θ)|: the log-likelihood is −T/2 of it up to a constant. */
    logDet: number;
  }
  const run = (sigmaStart: Mat): Run => {
    warm = null;
    let sigma = sigmaStart;
    let theta = args.theta0.slice();
    let iterations = 0;
    let converged = false;
    let optimality: OptimalityCheck | null = null;
    let last: { A: Mat; rank: number } | null = null;
    let sigmaNext = sigma;
    while (iterations < args.maxIterations) {
      iterations++;
      const s = step(sigma);
      let num = 0;
      let den = 0;
      for (let j = 0; j < k; j++) {
        num += (s.theta[j]! - theta[j]!) ** 2;
        den += theta[j]! ** 2;
      }
      theta = s.theta;
      last = { A: s.A, rank: s.rank };
      sigmaNext = residualSigma(theta);
      if (iterations > 1 && Math.sqrt(num / Math.max(den, 1e-300)) <= args.tolerance) {
        // θ has settled; finish only where the optimality conditions hold, else keep iterating.
        optimality = optimalityAt(theta, sigmaNext);
        if (optimality.satisfied) {
          converged = true;
          break;
        }
      }
      if (iterations === args.maxIterations) break;
      sigma = sigmaNext;
    }
    if (!converged) optimality = optimalityAt(theta, sigmaNext);
    return { theta, sigma, iterations, converged, optimality: optimality!, A: last!.A, rank: last!.rank, logDet: logDetOf(sigmaNext) };
  };
  // The likelihood need not have one maximum (the numeraire equation is quadratic in prices), so
  // two starts: the given Σ̂, and one that weights the last (numeraire) equation a hundredfold,
  // which leads into the basin where B is fitted to it first. The best likelihood is kept,
  // preferring a start that converged.
  const runs = [run(args.sigma0)];
  const n0 = args.sigma0.length;
  runs.push(run(args.sigma0.map((row, i) => row.map((v, j) => (i !== j ? 0 : i === n0 - 1 ? v / 100 : v)))));
  const chosen = runs.reduce((a, b) => (b.converged !== a.converged ? (b.converged ? b : a) : b.logDet < a.logDet - 1e-12 * Math.abs(a.logDet) ? b : a));
  const { theta, sigma, converged, optimality, A, rank } = chosen;
  const iterations = runs.reduce((s, r) => s + r.iterations, 0);

  // Covariance: the inverse information on the face C = L L′, L of size (n−1) × rank (pseudo-
  // inverse: rotations L → LQ leave C unchanged), mapped to θ by the delta method. In the
  // interior (full rank) this is A⁻¹, the covariance of the unrestricted ML estimate.
  let covariance: Mat;
  let covarianceRank: number;
  if (rank === size) {
    covariance = inverseSymmetric(A);
    covarianceRank = k;
  } else {
    // ∂c/∂L_ac at C = L L′ (L: the top `rank` eigenvectors scaled by √eigenvalue), column a·rank + c.
    const q = size * rank + nonBlock.length;
    const G = zeros(k, q);
    factorJacobian(factorOf(block.toMatrix(theta), rank), size, block.fromMatrix).forEach((dc, p) => bi.forEach((j, e) => (G[j]![p] = dc[e]!)));
    nonBlock.forEach((j, x) => (G[j]![size * rank + x] = 1));
    const GtAG = matMulT(G, matMul(A, G));
    const dsc = GtAG.map((row, i) => (row[i]! > 0 ? 1 / Math.sqrt(row[i]!) : 1));
    const scaled = GtAG.map((row, i) => row.map((val, j) => val * dsc[i]! * dsc[j]!));
    const pinv = pinvSymmetric(scaled, 1e-10);
    covarianceRank = pinv.rank;
    const Vpsi = pinv.inverse.map((row, i) => row.map((val, j) => val * dsc[i]! * dsc[j]!));
    covariance = matMul(G, matMulT(Vpsi, G));
  }
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

function logDetOf(S: Mat): number {
  const L = choleskyOf(S);
  if (!L) return Infinity;
  return 2 * L.reduce((s, row, i) => s + Math.log(row[i]!), 0);
}

/** L (n−1 × r) with L L′ the rank-r part of C (leading eigenvectors × √eigenvalue). */
function factorOf(C: Mat, r: number): Mat {
  const size = C.length;
  const { values, vectors } = symmetricEigen(C);
  return Array.from({ length: size }, (_, a) =>
    Array.from({ length: r }, (_, col) => vectors[a]![size - r + col]! * Math.sqrt(Math.max(values[size - r + col]!, 0))),
  );
}

/** q(c) = (c − ĉ)'M(c − ĉ) and its gradient 2M(c − ĉ). */
function quadratic(M: Mat, chat: number[], c: ArrayLike<number>): { q: number; g: number[] } {
  const nb = chat.length;
  const g = new Array<number>(nb);
  let q = 0;
  for (let a = 0; a < nb; a++) {
    let r = 0;
    for (let b = 0; b < nb; b++) r += M[a]![b]! * (c[b]! - chat[b]!);
    g[a] = 2 * r;
    q += (c[a]! - chat[a]!) * r;
  }
  return { q, g };
}

/** The symmetric Λ with tr(Λ dC) = g·c(dC) for every symmetric dC (c = fromMatrix, linear). */
function multiplierOf(g: number[], size: number, fromMatrix: (C: Mat) => number[]): Mat {
  const Lam = zeros(size, size);
  for (let a = 0; a < size; a++)
    for (let b = a; b < size; b++) {
      const dC = zeros(size, size);
      dC[a]![b] = 1;
      dC[b]![a] = 1;
      const df = fromMatrix(dC).reduce((s, v, e) => s + v * g[e]!, 0);
      const v = a === b ? df : df / 2;
      Lam[a]![b] = v;
      Lam[b]![a] = v;
    }
  return Lam;
}

/**
 * The rest of the KKT conditions of min q over C ⪰ 0 at a point that is stationary on its face
 * (there Λ C = 0 already): the multiplier Λ = ∂q/∂C is positive semidefinite in standard-error
 * units of C (D from M⁻¹), to 1e-8, and C is.
 */
function coneKkt(M: Mat, chat: number[], c: number[], basis: Entry[][], size: number, matrixOf: (c: ArrayLike<number>) => Mat, fromMatrix: (C: Mat) => number[]): boolean {
  const { g } = quadratic(M, chat, c);
  const Lam = multiplierOf(g, size, fromMatrix);
  const D = seDiagonal(inverseSymmetric(M), basis, size);
  const C = matrixOf(c);
  const Lt = Lam.map((row, a) => row.map((v, b) => v * D[a]! * D[b]!));
  const Ct = C.map((row, a) => row.map((v, b) => v / (D[a]! * D[b]!)));
  const normC = Math.sqrt(Ct.reduce((s, row) => s + row.reduce((t, v) => t + v * v, 0), 0));
  const tol = 1e-8;
  return jacobiEigenvalues(Lt)[0]! >= -tol && jacobiEigenvalues(Ct)[0]! >= -tol * Math.max(1, normC);
}

/** J: ∂c/∂L_{a,l} of c(L L′) for L (size × r), from dC = E_al L′ + L E_la; one column per (a, l), a-major. */
function factorJacobian(L: Mat, size: number, fromMatrix: (C: Mat) => number[]): number[][] {
  const r = L[0]?.length ?? 0;
  const J: number[][] = [];
  for (let a = 0; a < size; a++)
    for (let l = 0; l < r; l++) {
      const dC = zeros(size, size);
      for (let j = 0; j < size; j++) {
        dC[a]![j]! += L[j]![l]!;
        dC[j]![a]! += L[j]![l]!;
      }
      J.push(fromMatrix(dC));
    }
  return J;
}

/** Standard errors of the diagonal entries C_aa, from the covariance V of the block coordinates. */
function seDiagonal(V: Mat, basis: Entry[][], size: number): number[] {
  return Array.from({ length: size }, (_, a) => {
    const w = basis.map((entries) => entries.reduce((s, [r, col, v]) => (r === a && col === a ? s + v : s), 0));
    let v = 0;
    for (let e = 0; e < w.length; e++) for (let f = 0; f < w.length; f++) v += w[e]! * V[e]![f]! * w[f]!;
    return v > 0 ? Math.sqrt(v) : 1;
  });
}

/**
 * min over L (n−1 × r) of q(c(L L′)) by Newton's method with a line search, from L0: the minimum
 * on the face of rank-r matrices near L0 L0′. The Hessian is 2(J′MJ + Λ ⊗ I) (J = ∂c/∂L); where
 * it is not positive definite the Gauss–Newton part alone is used. Singular systems (rotations
 * L → LQ leave C unchanged) are solved by the pseudo-inverse.
 */
function faceNewton(M: Mat, chat: number[], L0: Mat, size: number, fromMatrix: (C: Mat) => number[]): { c: number[]; rank: number; settled: boolean } | null {
  const r = L0[0]?.length ?? 0;
  const cOf = (L: Mat): number[] => {
    const C = zeros(size, size);
    for (let a = 0; a < size; a++)
      for (let b = 0; b < size; b++) {
        let s = 0;
        for (let l = 0; l < r; l++) s += L[a]![l]! * L[b]![l]!;
        C[a]![b] = s;
      }
    return fromMatrix(C);
  };
  let L = L0.map((row) => row.slice());
  let c = cOf(L);
  if (r === 0) return { c, rank: 0, settled: true };
  let settled = false;
  for (let it = 0; it < 30; it++) {
    const { q, g: gc } = quadratic(M, chat, c);
    const J = factorJacobian(L, size, fromMatrix);
    const grad = J.map((col) => col.reduce((s, v, e) => s + v * gc[e]!, 0));
    const MJ = J.map((col) => M.map((row) => row.reduce((s, v, e) => s + v * col[e]!, 0)));
    const gn = J.map((colA) => MJ.map((colB) => 2 * colA.reduce((s, v, e) => s + v * colB[e]!, 0)));
    const Lam = multiplierOf(gc, size, fromMatrix);
    const H = gn.map((row, p) => row.map((v, p2) => (p % r === p2 % r ? v + 2 * Lam[Math.floor(p / r)]![Math.floor(p2 / r)]! : v)));
    let d = solveSymmetric(H, grad).map((v) => -v);
    let slope = grad.reduce((s, v, p) => s + v * d[p]!, 0);
    if (!(slope < 0)) {
      d = solveSymmetric(gn, grad).map((v) => -v);
      slope = grad.reduce((s, v, p) => s + v * d[p]!, 0);
    }
    // Newton decrement: what a further step could still lower q by (≈ −slope/2).
    if (-slope <= 1e-14 * (1 + q)) settled = true;
    if (!(slope < 0) || -slope <= 1e-28 * (1 + q)) break;
    // Armijo line search; near the minimum the predicted decrease is below the rounding of q,
    // so a step that does not raise q beyond that rounding is taken (the gradient still shrinks).
    const rounding = 1e-15 * (1 + Math.abs(q));
    let t = 1;
    let moved = false;
    for (let ls = 0; ls < 40; ls++, t /= 2) {
      const Ln = L.map((row, a) => row.map((v, l) => v + t * d[a * r + l]!));
      const cn = cOf(Ln);
      if (quadratic(M, chat, cn).q <= q + 1e-4 * t * slope + (-slope < 1e3 * rounding ? rounding : 0)) {
        L = Ln;
        c = cn;
        moved = true;
        break;
      }
    }
    if (!moved) break;
  }
  return c.every(Number.isFinite) ? { c, rank: r, settled } : null;
}

/**
 * min over C ⪰ 0 of q(c) = (c − ĉ)'M(c − ĉ), c the coordinates of C in `basis` (M positive
 * definite). Log-barrier method: Newton on q(c) − μ·ln det C(c) for μ decreasing tenfold until
 * the duality gap bound μ·(n−1) is below 1e-10 (Boyd & Vandenberghe, Convex Optimization, §11.3);
 * then the exact minimum on each face C = V_r S V_r′ (V_r the r leading eigenvectors of the
 * barrier solution, S ⪰ 0 solved by least squares), keeping the best feasible point. The barrier
 * point is itself feasible, so the result is never worse than it.
 */
function coneQuadratic(
  M: Mat,
  chat: number[],
  basis: Entry[][],
  size: number,
  matrixOf: (c: ArrayLike<number>) => Mat,
  fromMatrix: (C: Mat) => number[],
): { c: number[]; rank: number } {
  const nb = chat.length;
  if (size === 0) return { c: [], rank: 0 };
  const q = (c: ArrayLike<number>): number => {
    let s = 0;
    for (let a = 0; a < nb; a++) {
      let r = 0;
      for (let b = 0; b < nb; b++) r += M[a]![b]! * (c[b]! - chat[b]!);
      s += (c[a]! - chat[a]!) * r;
    }
    return s;
  };
  // Start: the unconstrained C with its eigenvalues made positive.
  const start = symmetricEigen(matrixOf(chat));
  const scale = Math.max(...start.values.map(Math.abs)) || 1;
  const C0 = fromEigen(start.vectors, start.values.map((v) => Math.max(Math.abs(v), 1e-2 * scale)));
  let c = fromMatrix(C0);
  let mu = Math.max(q(c), 1e-8) / size;
  const gapTolerance = 1e-10;
  for (let stage = 0; stage < 40; stage++) {
    for (let it = 0; it < 100; it++) {
      const Lc = choleskyOf(matrixOf(c));
      if (!Lc) break;
      const W = inverseFromCholesky(Lc);
      const grad = new Array<number>(nb);
      const H = zeros(nb, nb);
      for (let e = 0; e < nb; e++) {
        let r = 0;
        for (let f = 0; f < nb; f++) r += M[e]![f]! * (c[f]! - chat[f]!);
        let t = 0;
        for (const [a, b, v] of basis[e]!) t += v * W[b]![a]!;
        grad[e] = 2 * r - mu * t;
        for (let f = e; f < nb; f++) {
          let h = 0;
          for (const [a, b, v] of basis[e]!) for (const [a2, b2, v2] of basis[f]!) h += v * v2 * W[b]![a2]! * W[b2]![a]!;
          H[e]![f] = 2 * M[e]![f]! + mu * h;
          H[f]![e] = H[e]![f]!;
        }
      }
      const d = solveSymmetric(H, grad).map((v) => -v);
      const slope = grad.reduce((s, g, e) => s + g * d[e]!, 0);
      if (!(slope < 0) || -slope / 2 <= 1e-13) break;
      const phi = (cc: number[], L: Mat): number => q(cc) - 2 * mu * L.reduce((s, row, i) => s + Math.log(row[i]!), 0);
      const phi0 = phi(c, Lc);
      let t = 1;
      let moved = false;
      for (let ls = 0; ls < 60; ls++, t /= 2) {
        const cn = c.map((v, e) => v + t * d[e]!);
        const Ln = choleskyOf(matrixOf(cn));
        if (Ln && phi(cn, Ln) <= phi0 + 0.25 * t * slope) {
          c = cn;
          moved = true;
          break;
        }
      }
      if (!moved) break;
    }
    if (mu * size <= gapTolerance) break;
    mu /= 10;
  }
  // Faces: C = V_r S V_r′ for each rank r, S by least squares; keep the best feasible point.
  const { values, vectors } = symmetricEigen(matrixOf(c));
  const maxEig = Math.max(...values, 0);
  let best = { c, rank: values.filter((v) => v > 1e-9 * maxEig).length, q: q(c) };
  for (let r = 0; r <= size; r++) {
    const cols = Array.from({ length: r }, (_, i) => size - r + i);
    const pairs: [number, number][] = [];
    for (let x = 0; x < r; x++) for (let y = x; y < r; y++) pairs.push([x, y]);
    const F = pairs.map(([x, y]) => {
      const C = zeros(size, size);
      for (let a = 0; a < size; a++)
        for (let b = 0; b < size; b++) {
          const va = vectors[a]!;
          const vb = vectors[b]!;
          C[a]![b] = va[cols[x]!]! * vb[cols[y]!]! + (x === y ? 0 : va[cols[y]!]! * vb[cols[x]!]!);
        }
      return fromMatrix(C);
    });
    let s: number[] = [];
    if (pairs.length) {
      const MF = F.map((col) => M.map((row) => row.reduce((acc, v, b) => acc + v * col[b]!, 0)));
      const N = F.map((colA) => MF.map((colB) => colA.reduce((acc, v, b) => acc + v * colB[b]!, 0)));
      const rhs = MF.map((col) => col.reduce((acc, v, b) => acc + v * chat[b]!, 0));
      s = solveSymmetric(N, rhs);
    }
    const S = zeros(r, r);
    pairs.forEach(([x, y], p) => {
      S[x]![y] = s[p]!;
      S[y]![x] = s[p]!;
    });
    const sEig = r ? jacobiEigenvalues(S) : [];
    if (r && !(sEig[0]! >= -1e-12 * Math.max(...sEig.map(Math.abs)))) continue;
    const cc = new Array<number>(nb).fill(0);
    F.forEach((col, p) => col.forEach((v, e) => (cc[e]! += v * s[p]!)));
    const qq = q(cc);
    if (!Number.isFinite(qq)) continue;
    // Prefer the lower rank when it is as good to rounding.
    if (qq < best.q - 1e-12 * (1 + Math.abs(best.q)) || (r < best.rank && qq <= best.q + 1e-12 * (1 + Math.abs(best.q)))) best = { c: cc, rank: r, q: qq };
  }
  return { c: best.c, rank: best.rank };
}

function fromEigen(vectors: Mat, values: number[]): Mat {
  const n = values.length;
  const out = zeros(n, n);
  for (let a = 0; a < n; a++)
    for (let b = 0; b < n; b++) {
      let s = 0;
      for (let l = 0; l < n; l++) s += vectors[a]![l]! * values[l]! * vectors[b]![l]!;
      out[a]![b] = s;
    }
  return out;
}

/** Lower Cholesky factor, or null when the matrix is not (numerically) positive definite. */
function choleskyOf(a: Mat): Mat | null {
  const n = a.length;
  const L = zeros(n, n);
  for (let j = 0; j < n; j++) {
    let d = a[j]![j]!;
    for (let c = 0; c < j; c++) d -= L[j]![c]! ** 2;
    if (!(d > 0)) return null;
    const ljj = Math.sqrt(d);
    L[j]![j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = 0.5 * (a[i]![j]! + a[j]![i]!);
      for (let c = 0; c < j; c++) s -= L[i]![c]! * L[j]![c]!;
      L[i]![j] = s / ljj;
    }
  }
  return L;
}

function inverseFromCholesky(L: Mat): Mat {
  const n = L.length;
  const out = zeros(n, n);
  for (let j = 0; j < n; j++) {
    const e = new Array<number>(n).fill(0);
    e[j] = 1;
    const x = choleskySolve(L, e);
    for (let i = 0; i < n; i++) out[i]![j] = x[i]!;
  }
  return out;
}

function choleskySolve(L: Mat, b: ArrayLike<number>): number[] {
  const n = L.length;
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let c = 0; c < i; c++) s -= L[i]![c]! * y[c]!;
    y[i] = s / L[i]![i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let c = i + 1; c < n; c++) s -= L[c]![i]! * y[c]!;
    y[i] = s / L[i]![i]!;
  }
  return y;
}

/**
 * Solve A x = b for a symmetric positive semidefinite A, guarded: Cholesky of the equilibrated
 * matrix when it is well conditioned, otherwise the minimum-norm solution by the pseudo-inverse.
 * Never throws on a singular A.
 */
function solveSymmetric(a: Mat, b: ArrayLike<number>): number[] {
  const n = a.length;
  if (n === 0) return [];
  const d = a.map((row, i) => (row[i]! > 0 && Number.isFinite(row[i]!) ? 1 / Math.sqrt(row[i]!) : 1));
  const s = a.map((row, i) => row.map((v, j) => v * d[i]! * d[j]!));
  const bs = d.map((di, i) => di * b[i]!);
  const L = choleskyOf(s);
  let x: number[];
  if (L && wellConditioned(L)) x = choleskySolve(L, bs);
  else {
    const { inverse } = pinvSymmetric(s, 1e-13);
    x = inverse.map((row) => row.reduce((acc, v, j) => acc + v * bs[j]!, 0));
  }
  return x.map((v, i) => v * d[i]!);
}

/** Inverse of a symmetric positive semidefinite matrix, guarded like solveSymmetric. */
function inverseSymmetric(a: Mat): Mat {
  const n = a.length;
  if (n === 0) return [];
  const d = a.map((row, i) => (row[i]! > 0 && Number.isFinite(row[i]!) ? 1 / Math.sqrt(row[i]!) : 1));
  const s = a.map((row, i) => row.map((v, j) => v * d[i]! * d[j]!));
  const L = choleskyOf(s);
  const inv = L && wellConditioned(L) ? inverseFromCholesky(L) : pinvSymmetric(s, 1e-13).inverse;
  return inv.map((row, i) => row.map((v, j) => v * d[i]! * d[j]!));
}

function wellConditioned(L: Mat): boolean {
  let lo = Infinity;
  let hi = 0;
  L.forEach((row, i) => {
    lo = Math.min(lo, row[i]!);
    hi = Math.max(hi, row[i]!);
  });
  return lo > 1e-7 * hi;
}

/** A · Bᵀ. */
function matMulT(a: Mat, b: Mat): Mat {
  return a.map((row) => b.map((rowB) => row.reduce((s, v, j) => s + v * rowB[j]!, 0)));
}
