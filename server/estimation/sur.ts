/**
 * Seemingly unrelated regressions with linear cross-equation restrictions R·β = q: equation-by-
 * equation OLS, one-step feasible GLS, or iterated FGLS to convergence, computed the way R's
 * systemfit does it (bordered normal equations, its residual-covariance conventions, its
 * convergence rule), so that its printed estimates can be reproduced exactly.
 */
import { choleskyLower, inverse, logDetSymmetricPD, solve, zeros, type Mat } from './linalg.js';

export type Column = ArrayLike<number>;

export interface SurEquationInput {
  name: string;
  y: Column;
  regressors: { name: string; values: Column }[];
}

/** Each equation's residuals y − Σ β·x, with `coefficient(i, r)` the β of equation i's regressor r. */
export function systemResiduals(equations: SurEquationInput[], coefficient: (equation: number, regressor: number) => number): Float64Array[] {
  return equations.map((eq, i) => {
    const e = new Float64Array(eq.y as ArrayLike<number>);
    const T = e.length;
    eq.regressors.forEach((reg, r) => {
      const beta = coefficient(i, r);
      const v = reg.values;
      for (let t = 0; t < T; t++) e[t]! -= beta * v[t]!;
    });
    return e;
  });
}

/**
 * Divisor of the residual covariance σ_ij = e_i'e_j / d (systemfit's `methodResidCov`):
 * 'noDfCor' d = T (Gaussian ML); 'geomean' d = √((T−K_i)(T−K_j)); 'max' d = T − max(K_i, K_j).
 */
export type ResidualCovarianceMethod = 'noDfCor' | 'geomean' | 'max';

export interface SurOptions {
  method?: 'OLS' | 'SUR';
  /** R (rows over all stacked coefficients, in equation order) and q (default zeros). */
  restrictions?: { matrix: Mat; rhs?: number[] };
  /** 1 gives one-step FGLS; larger values iterate (ITSUR). Default 1, as in systemfit. */
  maxIterations?: number;
  /** Stop when √(Σ(Δβ)² / Σβ_old²) ≤ tolerance. Default 1e-5, as in systemfit. */
  tolerance?: number;
  residualCovariance?: ResidualCovarianceMethod;
  /**
   * Cross products kept between calls, for a caller that refits with some of the same column
   * objects (e.g. the same regressors, a new dependent variable). The caller must not change a
   * column's values while it is in the cache.
   */
  crossProductCache?: CrossProductCache;
  /**
   * Compute each iteration's Σ̂ from the cross products instead of the residuals (no pass over
   * the data per iteration; loses digits to cancellation when the fit is nearly exact, so it is
   * for long panels whose Σ̂ only weights the equations, not for reproducing a reference library).
   */
  residualsFromCrossProducts?: boolean;
  /**
   * SUR only: start the iteration from GLS with this residual covariance instead of from OLS (a
   * second start: iterated SUR reaches a stationary point of the likelihood, which need not be the
   * highest one).
   */
  initialSigma?: Mat;
  /**
   * false: no pass over the data after the fit — `residuals` is empty and the residual covariance
   * and each equation's SSR come from the cross products (as with residualsFromCrossProducts), for a
   * caller that refits long panels and needs only the coefficients, their covariance and Σ̂.
   * Default true.
   */
  keepResiduals?: boolean;
  /**
   * The system's cross products when the caller has them (as systemCrossProducts returns them):
   * the regressors' columns are then not read, so this needs method 'SUR',
   * residualsFromCrossProducts and keepResiduals: false.
   */
  crossProducts?: SystemCrossProducts;
}

/** X_i'X_j, X_i'y_j and y_i'y_j of a system's equations (blocks indexed by equation). */
export interface SystemCrossProducts {
  xx: Mat[][];
  xy: number[][][];
  yy: Mat;
}

/** Cross products of pairs of column objects (see SurOptions.crossProductCache). */
export type CrossProductCache = WeakMap<object, WeakMap<object, number>>;

export interface SurEquationResult {
  name: string;
  coefficientNames: string[];
  /** Offset of this equation's first coefficient in the stacked vector. */
  offset: number;
  ssr: number;
  /** 1 − SSR / Σ(y − ȳ)². */
  r2: number;
  /** √(SSR / T). */
  rmse: number;
}

export interface SurResult {
  coefficients: number[];
  /** Stacked names `<equation>_<regressor>`, as systemfit prints them. */
  names: string[];
  covariance: Mat;
  standardErrors: number[];
  /** Σ̂ used in the last GLS step (systemfit's `residCovEst`). */
  sigmaUsed: Mat;
  /** Σ̂ recomputed from the final residuals with the same divisor (systemfit's `residCov`). */
  residualCovariance: Mat;
  /** Empty when the caller set keepResiduals: false. */
  residuals: Float64Array[];
  equations: SurEquationResult[];
  observations: number;
  iterations: number;
  converged: boolean;
  /** K_i net of restrictions that involve equation i alone (used by the Σ̂ divisors). */
  coefficientsNetOfRestrictions: number[];
}

export interface SurStarts {
  /** Concentrated log-likelihood −T/2·ln|Σ̂| (constants left out) reached from each start. */
  fromOls: number;
  fromReversed: number;
  /** The start whose maximum was kept (the higher likelihood; OLS on a tie). */
  kept: 'ols' | 'reversed';
}

/**
 * Iterated SUR from two starts, keeping the higher likelihood. Iterated SUR climbs to a stationary
 * point of the Gaussian likelihood, and the SUR likelihood can have more than one local maximum
 * (Drton & Richardson 2004, "Multimodality of the likelihood in the bivariate seemingly unrelated
 * regressions model", Biometrika 91(2): 383–392), so the usual start at OLS can stop at the lower
 * one. The second start is GLS with the first solution's residual correlations reversed in sign
 * (variances kept; if that matrix is not positive definite, with the correlations set to zero),
 * which starts the climb on the other side of the likelihood's ridge in correlation.
 * docs/profit-functions.md §5.
 */
export function fitSurTwoStarts(equations: SurEquationInput[], options: SurOptions = {}): SurResult & { starts: SurStarts } {
  const first = fitSur(equations, { ...options, method: 'SUR' });
  const T = first.observations;
  const ll = (r: SurResult): number => {
    try {
      return (-T / 2) * logDetSymmetricPD(r.residualCovariance);
    } catch {
      return -Infinity;
    }
  };
  const S = first.residualCovariance;
  const n = S.length;
  let start: Mat = S.map((row, i) => row.map((v, j) => (i === j ? v : -v)));
  if (!choleskyLower(start)) start = S.map((row, i) => row.map((v, j) => (i === j ? v : 0)));
  const l1 = ll(first);
  if (n < 2 || !S.every((row, i) => row[i]! > 0)) return { ...first, starts: { fromOls: l1, fromReversed: l1, kept: 'ols' } };
  let second: SurResult | null = null;
  try {
    second = fitSur(equations, { ...options, method: 'SUR', initialSigma: start });
  } catch {
    second = null;
  }
  const l2 = second ? ll(second) : -Infinity;
  // keep the second only when it is clearly higher (not rounding) and it converged
  const better = second !== null && second.converged && l2 > l1 + 1e-9 * Math.max(1, Math.abs(l1));
  return { ...(better ? second! : first), starts: { fromOls: l1, fromReversed: l2, kept: better ? 'reversed' : 'ols' } };
}

/**
 * Fit a system of linear equations by OLS or (iterated) SUR.
 * @throws Error when a design or the bordered system is singular
 */
export function fitSur(equations: SurEquationInput[], options: SurOptions = {}): SurResult {
  const method = options.method ?? 'SUR';
  const maxIterations = options.maxIterations ?? 1;
  const tolerance = options.tolerance ?? 1e-5;
  const covMethod = options.residualCovariance ?? 'geomean';
  const nEq = equations.length;
  const T = equations[0]!.y.length;
  const given = options.crossProducts;
  if (given && (method !== 'SUR' || !options.residualsFromCrossProducts || options.keepResiduals !== false))
    throw new Error('sur: given cross products need method SUR, residualsFromCrossProducts and keepResiduals: false');
  for (const eq of equations) {
    if (eq.y.length !== T) throw new Error(`sur: equation ${eq.name} has ${eq.y.length} observations, expected ${T}`);
    if (!given) for (const r of eq.regressors) if (r.values.length !== T) throw new Error(`sur: regressor ${r.name} of ${eq.name} has the wrong length`);
  }
  const kEq = equations.map((e) => e.regressors.length);
  const offsets: number[] = [];
  let K = 0;
  for (const k of kEq) {
    offsets.push(K);
    K += k;
  }

  const { xx: xxBlocks, xy: xyBlocks, yy } = given ?? systemCrossProducts(equations, options.crossProductCache);

  const R = options.restrictions?.matrix;
  const q = options.restrictions?.rhs ?? (R ? new Array<number>(R.length).fill(0) : []);
  if (R) for (const row of R) if (row.length !== K) throw new Error(`sur: restriction rows need ${K} entries`);

  // K_i less restrictions confined to equation i (cross-equation restrictions do not count).
  const kLi = kEq.slice();
  if (R) {
    for (const row of R) {
      const total = row.reduce((s, v) => s + v * v, 0);
      for (let i = 0; i < nEq; i++) {
        let part = 0;
        for (let c = offsets[i]!; c < offsets[i]! + kEq[i]!; c++) part += row[c]! * row[c]!;
        if (part === total) kLi[i]!--;
      }
    }
  }

  const gls = (sigmaInv: Mat | null, withCov = true): { coef: number[]; cov: Mat } => {
    const A = zeros(K, K);
    const b = new Array<number>(K).fill(0);
    for (let i = 0; i < nEq; i++) {
      for (let j = 0; j < nEq; j++) {
        const w = sigmaInv ? sigmaInv[i]![j]! : i === j ? 1 : 0;
        if (w === 0) continue;
        const blk = xxBlocks[i]![j]!;
        for (let a = 0; a < kEq[i]!; a++) for (let c = 0; c < kEq[j]!; c++) A[offsets[i]! + a]![offsets[j]! + c]! += w * blk[a]![c]!;
        const v = xyBlocks[i]![j]!;
        for (let a = 0; a < kEq[i]!; a++) b[offsets[i]! + a]! += w * v[a]!;
      }
    }
    if (!R || R.length === 0) {
      return { coef: solve(A, b), cov: withCov ? inverse(A) : [] };
    }
    const r = R.length;
    const W = zeros(K + r, K + r);
    for (let a = 0; a < K; a++) for (let c = 0; c < K; c++) W[a]![c] = A[a]![c]!;
    for (let l = 0; l < r; l++)
      for (let c = 0; c < K; c++) {
        W[K + l]![c] = R[l]![c]!;
        W[c]![K + l] = R[l]![c]!;
      }
    const rhs = [...b, ...q];
    const sol = solve(W, rhs);
    if (!withCov) return { coef: sol.slice(0, K), cov: [] };
    const winv = inverse(W);
    return { coef: sol.slice(0, K), cov: winv.slice(0, K).map((row) => row.slice(0, K)) };
  };

  const residualsOf = (coef: number[]): Float64Array[] => systemResiduals(equations, (i, a) => coef[offsets[i]! + a]!);

  /** Divisor of σ_ij (see ResidualCovarianceMethod). */
  const divisor = (i: number, j: number): number =>
    covMethod === 'noDfCor' ? T : covMethod === 'geomean' ? Math.sqrt((T - kLi[i]!) * (T - kLi[j]!)) : T - Math.max(kLi[i]!, kLi[j]!);
  /** e_i'e_j from the cross products: y_i'y_j − b_i'X_i'y_j − b_j'X_j'y_i + b_i'X_i'X_j b_j. */
  const residualCrossProduct = (coef: number[], i: number, j: number): number => {
    const bi = coef.slice(offsets[i]!, offsets[i]! + kEq[i]!);
    const bj = coef.slice(offsets[j]!, offsets[j]! + kEq[j]!);
    let s = yy[i]![j]!;
    for (let a = 0; a < bi.length; a++) s -= bi[a]! * xyBlocks[i]![j]![a]!;
    for (let b = 0; b < bj.length; b++) s -= bj[b]! * xyBlocks[j]![i]![b]!;
    const blk = xxBlocks[i]![j]!;
    for (let a = 0; a < bi.length; a++) for (let b = 0; b < bj.length; b++) s += bi[a]! * blk[a]![b]! * bj[b]!;
    return s;
  };
  /** The same Σ̂ from the cross products (no pass over the data). */
  const residCovFromCrossProducts = (coef: number[]): Mat => {
    const S = zeros(nEq, nEq);
    for (let i = 0; i < nEq; i++)
      for (let j = i; j < nEq; j++) {
        const d = divisor(i, j);
        const s = residualCrossProduct(coef, i, j);
        S[i]![j] = s / d;
        S[j]![i] = s / d;
      }
    return S;
  };
  const residCov = (res: Float64Array[]): Mat => {
    const S = zeros(nEq, nEq);
    for (let i = 0; i < nEq; i++)
      for (let j = i; j < nEq; j++) {
        let s = 0;
        const ei = res[i]!;
        const ej = res[j]!;
        for (let t = 0; t < T; t++) s += ei[t]! * ej[t]!;
        const d = divisor(i, j);
        S[i]![j] = s / d;
        S[j]![i] = s / d;
      }
    return S;
  };

  let { coef, cov } = gls(method === 'SUR' && options.initialSigma ? inverse(options.initialSigma) : null, method === 'OLS');
  let iterations = 0;
  let converged = true;
  let sigmaUsed: Mat;
  if (method === 'SUR') {
    let coefDiffRel = Infinity;
    sigmaUsed = zeros(nEq, nEq);
    while (coefDiffRel > tolerance && iterations < maxIterations) {
      iterations++;
      const old = coef;
      sigmaUsed = options.residualsFromCrossProducts ? residCovFromCrossProducts(coef) : residCov(residualsOf(coef));
      coef = gls(inverse(sigmaUsed), false).coef;
      let num = 0;
      let den = 0;
      for (let a = 0; a < K; a++) {
        num += (coef[a]! - old[a]!) ** 2;
        den += old[a]! ** 2;
      }
      coefDiffRel = Math.sqrt(num / den);
    }
    converged = maxIterations === 1 || coefDiffRel <= tolerance;
    // As systemfit: the covariance uses the Σ̂ of the last GLS step.
    cov = gls(inverse(sigmaUsed)).cov;
  } else {
    const res0 = residualsOf(coef);
    sigmaUsed = residCov(res0).map((row, i) => row.map((v, j) => (i === j ? v : 0)));
    cov = gls(inverse(sigmaUsed)).cov;
  }

  const keep = options.keepResiduals ?? true;
  const residuals = keep ? residualsOf(coef) : [];
  const residualCovariance = keep ? residCov(residuals) : residCovFromCrossProducts(coef);
  const eqResults: SurEquationResult[] = equations.map((eq, i) => {
    let ssr = 0;
    let sst = 0;
    if (keep) {
      const e = residuals[i]!;
      for (let t = 0; t < T; t++) ssr += e[t]! * e[t]!;
      let ym = 0;
      for (let t = 0; t < T; t++) ym += eq.y[t]!;
      ym /= T;
      for (let t = 0; t < T; t++) sst += (eq.y[t]! - ym) ** 2;
    } else {
      // e_i'e_i from the cross products (Σ̂_ii times its divisor), Σ(y − ȳ)² = y'y − (Σy)²/T
      ssr = residualCrossProduct(coef, i, i);
      const sy = columnSum(eq.y, T);
      sst = yy[i]![i]! - (sy * sy) / T;
    }
    return {
      name: eq.name,
      coefficientNames: eq.regressors.map((r) => r.name),
      offset: offsets[i]!,
      ssr,
      r2: 1 - ssr / sst,
      rmse: Math.sqrt(ssr / T),
    };
  });
  return {
    coefficients: coef,
    names: equations.flatMap((eq) => eq.regressors.map((r) => `${eq.name}_${r.name}`)),
    covariance: cov,
    standardErrors: cov.map((row, i) => Math.sqrt(Math.max(row[i]!, 0))),
    sigmaUsed,
    residualCovariance,
    residuals,
    equations: eqResults,
    observations: T,
    iterations,
    converged,
    coefficientsNetOfRestrictions: kLi,
  };
}

/**
 * Cross-products X_i'X_j and X_i'y_j of a system's equations. Columns shared between equations
 * (the same array object) are multiplied once, which matters for long panels.
 */
export function systemCrossProducts(equations: SurEquationInput[], cache?: CrossProductCache): SystemCrossProducts {
  const T = equations[0]!.y.length;
  const columnIndex = new Map<Column, number>();
  const columns: Column[] = [];
  const idOf = (c: Column): number => {
    let id = columnIndex.get(c);
    if (id === undefined) {
      id = columns.length;
      columnIndex.set(c, id);
      columns.push(c);
    }
    return id;
  };
  const xIds = equations.map((e) => e.regressors.map((r) => idOf(r.values)));
  const yIds = equations.map((e) => idOf(e.y));
  const gram = crossProducts(columns, T, cache);
  const nEq = equations.length;
  const xx: Mat[][] = [];
  const xy: number[][][] = [];
  for (let i = 0; i < nEq; i++) {
    xx.push([]);
    xy.push([]);
    for (let j = 0; j < nEq; j++) {
      xx[i]!.push(xIds[i]!.map((a) => xIds[j]!.map((b) => gram[a]![b]!)));
      xy[i]!.push(xIds[i]!.map((a) => gram[a]![yIds[j]!]!));
    }
  }
  const yy = yIds.map((a) => yIds.map((b) => gram[a]![b]!));
  return { xx, xy, yy };
}

/** Gram matrix of columns (upper triangle computed, mirrored). */
/** out[q] = Σ_t a_t c_q,t for four columns in one pass (a small module-level loop: optimised once). */
export function dotFour(out: Float64Array, a: Float64Array, c0: Float64Array, c1: Float64Array, c2: Float64Array, c3: Float64Array, T: number): void {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  for (let t = 0; t < T; t++) {
    const v = a[t]!;
    s0 += v * c0[t]!;
    s1 += v * c1[t]!;
    s2 += v * c2[t]!;
    s3 += v * c3[t]!;
  }
  out[0] = s0;
  out[1] = s1;
  out[2] = s2;
  out[3] = s3;
}

/** Σ_t v_t in order (module level: optimised once). */
function columnSum(v: Column, T: number): number {
  let s = 0;
  for (let t = 0; t < T; t++) s += v[t]!;
  return s;
}

function dotOne(a: Float64Array, b: Float64Array, T: number): number {
  let s = 0;
  for (let t = 0; t < T; t++) s += a[t]! * b[t]!;
  return s;
}

export function crossProducts(columns: Column[], T: number, cache?: CrossProductCache): Mat {
  const U = columns.length;
  const g = zeros(U, U);
  const arrs = columns.map((c) => (c instanceof Float64Array ? c : Float64Array.from(c as ArrayLike<number>)));
  const store = (a: number, b: number, s: number): void => {
    g[a]![b] = s;
    g[b]![a] = s;
    if (cache) {
      for (const [x, y] of [
        [columns[a], columns[b]],
        [columns[b], columns[a]],
      ] as [object, object][]) {
        let inner = cache.get(x);
        if (!inner) cache.set(x, (inner = new WeakMap()));
        inner.set(y, s);
      }
    }
  };
  const four = new Float64Array(4);
  for (let a = 0; a < U; a++) {
    const ca = arrs[a]!;
    // the pairs (a, b ≥ a) not cached yet, four columns per pass over ca (each sum in the same order)
    const todo: number[] = [];
    for (let b = a; b < U; b++) {
      const hit = cache?.get(columns[a] as object)?.get(columns[b] as object);
      if (hit !== undefined) {
        g[a]![b] = hit;
        g[b]![a] = hit;
      } else todo.push(b);
    }
    let j = 0;
    for (; j + 4 <= todo.length; j += 4) {
      const b0 = todo[j]!;
      const b1 = todo[j + 1]!;
      const b2 = todo[j + 2]!;
      const b3 = todo[j + 3]!;
      const c0 = arrs[b0]!;
      const c1 = arrs[b1]!;
      const c2 = arrs[b2]!;
      const c3 = arrs[b3]!;
      dotFour(four, ca, c0, c1, c2, c3, T);
      store(a, b0, four[0]!);
      store(a, b1, four[1]!);
      store(a, b2, four[2]!);
      store(a, b3, four[3]!);
    }
    for (; j < todo.length; j++) {
      const b = todo[j]!;
      store(a, b, dotOne(ca, arrs[b]!, T));
    }
  }
  return g;
}
