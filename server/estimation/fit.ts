/**
 * Fitting a profit function to a netput dataset: build the Hotelling netput system for the chosen
 * form, estimate it by iterated SUR with the cross-equation symmetry restrictions (Σ̂ with divisor
 * T, to convergence, i.e. Gaussian ML), check convexity in prices and impose it when it fails.
 */
import { Matrix, QrDecomposition } from 'ml-matrix';
import type { CoefficientEstimate, CurvatureReport, EquationFit, FitResult, MonotonicityReport } from '../../shared/estimation-types.js';
import { checkConvexity, imposeConvexity, leadingBlock } from './curvature.js';
import type { NetputDataset } from './dataset.js';
import { EstimationInputError } from './errors.js';
import { formOf, resolveFormName } from './forms.js';
import { covarianceToCorrelation, dot, jacobiEigenvalues, logDetSymmetricPD, mean, type Mat } from './linalg.js';
import type { CurvatureBlock, FormName, ModelData, ModelLayout } from './model.js';
import { fitSurTwoStarts, systemResiduals, type SurEquationInput } from './sur.js';

export type { CoefficientEstimate, CurvatureReport, EquationFit, FitResult, MonotonicityReport } from '../../shared/estimation-types.js';

export interface FitOptions {
  /** 'nq' (default) or 'gl', or the full form names. */
  form?: 'nq' | 'gl' | FormName;
  /** The numeraire item (NQ normalisation). Default: the last input column of the file. */
  numeraire?: string;
  /** Add a linear trend (season year − first season year + 1) as a factor. */
  trend?: boolean;
  /**
   * 'auto' (default): impose convexity only when the symmetry-restricted estimate violates it;
   * 'impose': always use the LL' parameterisation; 'check': never impose, only report.
   */
  curvature?: 'auto' | 'impose' | 'check';
  /** ITSUR iteration cap (default 500). */
  maxIterations?: number;
  /** Stop when the relative change of the coefficients is below this (default 1e-8). */
  tolerance?: number;
}

interface PreparedModel {
  layout: ModelLayout;
  data: ModelData;
  equations: SurEquationInput[];
  slots: number[][];
}

/** Build the layout, data columns and estimating equations, validating options against the data. */
export function prepareModel(ds: NetputDataset, options: FitOptions = {}): PreparedModel {
  const formName = resolveFormName(options.form);
  const form = formOf(formName);
  const itemNames = ds.items.map((i) => i.name);
  let numeraire = options.numeraire;
  if (numeraire !== undefined) {
    if (!itemNames.includes(numeraire))
      throw new EstimationInputError(`numeraire "${numeraire}" is not an item of the file (items: ${itemNames.join(', ')})`);
  } else {
    const inputs = ds.items.filter((i) => i.role === 'input');
    numeraire = (inputs.length ? inputs[inputs.length - 1]! : ds.items[ds.items.length - 1]!).name;
  }
  if (options.trend && ds.fixedFactors.includes('trend'))
    throw new EstimationInputError('column fixed:trend clashes with the fitted trend; rename the column or leave out --trend', { column: 'fixed:trend' });
  const order = [...ds.items.keys()].filter((i) => ds.items[i]!.name !== numeraire);
  order.push(itemNames.indexOf(numeraire));
  const items = order.map((i) => ds.items[i]!);
  const factors = [...ds.fixedFactors, ...(options.trend ? ['trend'] : [])];
  const trendOrigin = options.trend ? Math.min(...ds.seasonYears) : null;
  const layout: ModelLayout = {
    form: formName,
    items,
    numeraire,
    factors,
    quadraticFactors: ds.fixedFactors.length,
    trendOrigin,
    parameterNames: form.parameterNames(items, factors, ds.fixedFactors.length),
  };
  const T = ds.rows.length;
  const data: ModelData = {
    T,
    prices: order.map((i) => Float64Array.from(ds.prices[i]!)),
    netputs: order.map((i) => {
      // outputs positive, inputs negative (a plain loop: a mapping callback per element is slow on long panels)
      const q = ds.quantities[i]!;
      const out = new Float64Array(q.length);
      const sign = ds.items[i]!.role === 'output' ? 1 : -1;
      for (let o = 0; o < q.length; o++) out[o] = sign * q[o]!;
      return out;
    }),
    factors: [
      ...ds.fixed.map((f) => Float64Array.from(f)),
      ...(options.trend ? [Float64Array.from(ds.seasonYears, (y) => y - trendOrigin! + 1)] : []),
    ],
  };
  const { equations, slots } = form.equations(layout, data);
  const kMax = Math.max(...equations.map((e) => e.regressors.length));
  const worst = equations.find((e) => e.regressors.length === kMax)!;
  if (T <= kMax)
    throw new EstimationInputError(
      `${T} observation${T === 1 ? '' : 's'} are too few: the ${worst.name} equation has ${kMax} coefficients, so at least ${kMax + 1} observations are needed`,
    );
  const checked = new Set<string>();
  for (const eq of equations) {
    // equations with the same columns (all non-numeraire NQ equations) are checked once
    const key = eq.regressors.map((r) => columnId(r.values)).join(',');
    if (checked.has(key)) continue;
    checked.add(key);
    checkDesign(eq, layout);
  }
  return { layout, data, equations, slots };
}

/**
 * Fit the profit function. Pure and deterministic; the result is plain JSON.
 * @throws EstimationInputError for unusable options or data (too few observations, collinear prices, …)
 */
export function fitProfitFunction(ds: NetputDataset, options: FitOptions = {}): FitResult {
  const { layout, data, equations, slots } = prepareModel(ds, options);
  const form = formOf(layout.form);
  const k = layout.parameterNames.length;
  const T = data.T;
  const n = layout.items.length;
  const tolerance = options.tolerance ?? 1e-8;
  const maxIterations = options.maxIterations ?? 500;
  const warnings: string[] = [];

  const { rep, R } = symmetryRestrictions(equations, slots, k);
  let sur;
  try {
    sur = fitSurTwoStarts(equations, {
      method: 'SUR',
      maxIterations,
      tolerance,
      residualCovariance: 'noDfCor',
      ...(R.length ? { restrictions: { matrix: R } } : {}),
    });
  } catch (e) {
    if (e instanceof Error && /singular/.test(e.message))
      throw new EstimationInputError('the netput system cannot be estimated: its normal equations are singular (check for items whose netputs or prices never vary)');
    throw e;
  }
  if (!sur.converged) warnings.push(`iterated SUR did not converge in ${maxIterations} iterations`);
  if (sur.starts.kept === 'reversed')
    warnings.push(
      `iterated SUR started from OLS stopped at a lower maximum of the likelihood (log-likelihood ${(sur.starts.fromReversed - sur.starts.fromOls).toPrecision(3)} lower); the higher maximum, reached from a second start, is kept`,
    );
  let theta = rep.map((pos) => sur.coefficients[pos]!);
  let covariance = rep.map((a) => rep.map((b) => sur.covariance[a]![b]!));
  let iterations = sur.iterations;
  let converged = sur.converged;

  const means = {
    prices: data.prices.map(mean),
    fixed: data.factors.map(mean),
  };
  const block = form.curvatureBlock(layout, means.prices);
  const unrestricted = checkConvexity(block.toMatrix(theta));
  const mode = options.curvature ?? 'auto';
  const impose = mode === 'impose' || (mode === 'auto' && !unrestricted.convex);
  let curvatureExtra: Pick<CurvatureReport, 'binding' | 'iterations' | 'converged' | 'optimality'> = {};
  if (impose) {
    const imposed = imposeConvexity({
      equations,
      slots,
      parameterCount: k,
      theta0: theta,
      sigma0: sur.sigmaUsed,
      block,
      maxIterations,
      tolerance,
    });
    theta = imposed.theta;
    covariance = imposed.covariance;
    iterations = imposed.iterations;
    converged = imposed.converged;
    curvatureExtra = { binding: imposed.binding, iterations: imposed.iterations, converged: imposed.converged, optimality: imposed.optimality };
    if (!imposed.converged)
      warnings.push(
        imposed.optimality.satisfied === false
          ? `the convexity-constrained fit did not converge: after ${imposed.iterations} iterations its optimality (Karush–Kuhn–Tucker) conditions do not hold, so the estimates are not the constrained maximum`
          : `the convexity-constrained fit did not converge in ${maxIterations} iterations`,
      );
    if (imposed.binding) warnings.push('convexity binds: the constrained price Hessian is singular (estimates on the boundary; their standard errors are conditional on it)');
    if (!block.global) warnings.push('for the generalized Leontief form convexity is imposed at the sample-mean prices only');
  }

  // Residuals, Σ̂ and equation statistics of the reported θ.
  const residuals = systemResiduals(equations, (i, r) => theta[slots[i]![r]!]!);
  const sigma = residuals.map((ei) => residuals.map((ej) => dot(ei, ej) / T));
  const standardErrors = covariance.map((row, i) => Math.sqrt(Math.max(row[i]!, 0)));
  const eqFits = equationFits(layout, equations, slots, theta, standardErrors, (i) => dot(residuals[i]!, residuals[i]!), T);
  let logDet: number;
  try {
    logDet = logDetSymmetricPD(sigma);
  } catch {
    throw new EstimationInputError('the residual covariance is singular: some netput is fitted exactly (an equation is an identity of the others?)');
  }
  const logLikelihood = systemLogLikelihood(T, n, logDet);

  // Fitted netputs are the data less the residuals (the estimating equations are the netput equations).
  const checks = fitChecks({
    layout,
    form,
    block,
    theta,
    prices: data.prices,
    observations: T,
    fitted: (i, t) => data.netputs[i]![t]! - residuals[i]![t]!,
    unrestricted,
    imposed: impose,
    extra: curvatureExtra,
  });
  return {
    layout,
    observations: T,
    theta,
    covariance,
    standardErrors,
    sigma,
    residualCorrelation: covarianceToCorrelation(sigma),
    equations: eqFits,
    ...likelihoodFigures(logLikelihood, k, T),
    iterations,
    converged,
    seasonYears: { first: Math.min(...ds.seasonYears), last: Math.max(...ds.seasonYears) },
    means,
    referencePrices: means.prices,
    ...checks,
    warnings,
  };
}

/** Gaussian log-likelihood of an n-equation system over T observations, from the log-determinant of its Σ̂. */
export function systemLogLikelihood(T: number, n: number, logDet: number): number {
  return (-T / 2) * (n * Math.log(2 * Math.PI) + logDet + n);
}

/** A fit's log-likelihood with its parameter count and information criteria (AIC, BIC over T observations), in FitResult's order. */
export function likelihoodFigures(logLikelihood: number, k: number, T: number) {
  return { logLikelihood, parameterCount: k, aic: -2 * logLikelihood + 2 * k, bic: -2 * logLikelihood + k * Math.log(T) };
}

/** Per-equation statistics and coefficient table of a netput system at θ, given each equation's SSR. */
export function equationFits(
  layout: ModelLayout,
  equations: SurEquationInput[],
  slots: number[][],
  theta: number[],
  standardErrors: number[],
  ssrOf: (equation: number) => number,
  observations: number,
): EquationFit[] {
  return equations.map((eq, i) => {
    const ssr = ssrOf(i);
    const ym = mean(eq.y);
    let sst = 0;
    for (let t = 0; t < observations; t++) sst += (eq.y[t]! - ym) ** 2;
    return {
      item: layout.items[i]!.name,
      role: layout.items[i]!.role,
      r2: 1 - ssr / sst,
      rmse: Math.sqrt(ssr / observations),
      ssr,
      coefficients: eq.regressors.map((reg, r) => {
        const th = slots[i]![r]!;
        return { name: `${eq.name}_${reg.name}`, parameter: layout.parameterNames[th]!, estimate: theta[th]!, standardError: standardErrors[th]! };
      }),
    };
  });
}

/**
 * The checks a fit reports at its θ (the pooled fit and the per-hectare model alike): convexity in
 * prices at the reference point and at every observation's prices (everywhere or nowhere for a form
 * whose curvature does not depend on prices), and per item the observations whose fitted netput has
 * the wrong sign (an output not above 0, an input not below 0).
 */
export function fitChecks(a: {
  layout: ModelLayout;
  form: ReturnType<typeof formOf>;
  block: CurvatureBlock;
  theta: number[];
  prices: ArrayLike<number>[];
  observations: number;
  fitted: (item: number, observation: number) => number;
  unrestricted: { eigenvalues: number[]; convex: boolean };
  imposed: boolean;
  extra: Pick<CurvatureReport, 'binding' | 'iterations' | 'converged' | 'optimality'>;
}): Pick<FitResult, 'curvature' | 'monotonicity' | 'monotonicityViolationShare'> {
  const { layout, block, theta } = a;
  const T = a.observations;
  const n = layout.items.length;
  const finalCheck = checkConvexity(block.toMatrix(theta));
  let violating = 0;
  if (block.global) violating = finalCheck.convex ? 0 : T;
  else {
    const p = new Array<number>(n);
    for (let t = 0; t < T; t++) {
      for (let i = 0; i < n; i++) p[i] = a.prices[i]![t]!;
      const eig = jacobiEigenvalues(leadingBlock(a.form.priceHessian(layout, theta, p)));
      const maxAbs = eig.reduce((acc, v) => Math.max(acc, Math.abs(v)), 0);
      if (eig[0]! < -1e-9 * maxAbs) violating++;
    }
  }
  const wrongSign = new Array<number>(n).fill(0);
  let anyWrong = 0;
  for (let t = 0; t < T; t++) {
    let wrong = false;
    for (let i = 0; i < n; i++) {
      const y = a.fitted(i, t);
      const bad = layout.items[i]!.role === 'output' ? !(y > 0) : !(y < 0);
      if (bad) {
        wrongSign[i]!++;
        wrong = true;
      }
    }
    if (wrong) anyWrong++;
  }
  return {
    curvature: {
      global: block.global,
      unrestrictedEigenvalues: a.unrestricted.eigenvalues,
      unrestrictedConvex: a.unrestricted.convex,
      imposed: a.imposed,
      eigenvalues: finalCheck.eigenvalues,
      convexAtMeans: finalCheck.convex,
      violatingObservations: violating,
      violationShare: violating / T,
      ...a.extra,
    },
    monotonicity: layout.items.map((it, i) => ({ item: it.name, role: it.role, violations: wrongSign[i]!, share: wrongSign[i]! / T })),
    monotonicityViolationShare: anyWrong / T,
  };
}

/**
 * Stacked coefficient positions of a netput system and the restrictions R·β = 0 that tie every
 * structural parameter's copies together (the cross-equation symmetry restrictions): rep[θ] is the
 * stacked position of θ's first copy.
 */
export function symmetryRestrictions(equations: SurEquationInput[], slots: number[][], k: number): { rep: number[]; R: number[][]; offsets: number[] } {
  const offsets: number[] = [];
  let K = 0;
  for (const eq of equations) {
    offsets.push(K);
    K += eq.regressors.length;
  }
  const rep = new Array<number>(k).fill(-1);
  const ties: [number, number][] = [];
  slots.forEach((sl, i) =>
    sl.forEach((theta, r) => {
      const pos = offsets[i]! + r;
      if (rep[theta]! < 0) rep[theta] = pos;
      else ties.push([rep[theta]!, pos]);
    }),
  );
  const R = ties.map(([a, b]) => {
    const row = new Array<number>(K).fill(0);
    row[a] = 1;
    row[b] = -1;
    return row;
  });
  return { rep, R, offsets };
}

/** Human-readable name of a regressor column, for messages. */
function describeRegressor(name: string, eq: string, layout: ModelLayout): string {
  const num = layout.numeraire;
  const factor = (f: string): string => (f === 'trend' && layout.trendOrigin !== null ? 'the trend' : `fixed:${f}`);
  if (name === '(Intercept)') return 'the constant';
  if (layout.factors.includes(name)) return factor(name);
  let m: RegExpExecArray | null;
  if ((m = /^p_(.+)$/.exec(name))) return `price:${m[1]}/price:${num}`;
  if ((m = /^s_(.+)$/.exec(name))) return `√(price:${m[1]}/price:${eq})`;
  for (const f of layout.factors) {
    if (name === `hz_${f}`) return `${factor(f)} squared`;
    for (const g of layout.factors) if (name === `hz_${f}_${g}`) return `${factor(f)} × ${factor(g)}`;
  }
  for (const a of layout.items) {
    if (name === `hp_${a.name}`) return `(price:${a.name}/price:${num})²`;
    for (const b of layout.items) if (name === `hp_${a.name}_${b.name}`) return `price:${a.name}·price:${b.name}/price:${num}²`;
  }
  return name;
}

const columnIds = new WeakMap<object, number>();
let nextColumnId = 0;
function columnId(c: ArrayLike<number>): number {
  let id = columnIds.get(c as object);
  if (id === undefined) {
    id = nextColumnId++;
    columnIds.set(c as object, id);
  }
  return id;
}

/**
 * Reject a rank-deficient equation design, naming the columns that are exactly collinear.
 * Screening uses a Cholesky factorisation of the scaled cross-product matrix (cheap for long
 * panels); a column it flags is confirmed by Gram–Schmidt on the data itself before rejecting.
 */
function checkDesign(eq: SurEquationInput, layout: ModelLayout): void {
  const T = eq.y.length;
  const K = eq.regressors.length;
  const cols = eq.regressors.map((r) => (r.values instanceof Float64Array ? r.values : Float64Array.from(r.values as ArrayLike<number>)));
  const norms = cols.map((c) => Math.sqrt(dot(c, c)));
  const G: number[][] = [];
  for (let a = 0; a < K; a++) {
    G.push(new Array<number>(K).fill(0));
    for (let b = 0; b <= a; b++) {
      const v = norms[a]! > 0 && norms[b]! > 0 ? dot(cols[a]!, cols[b]!) / (norms[a]! * norms[b]!) : 0;
      G[a]![b] = v;
      G[b]![a] = v;
    }
  }
  const L: number[][] = G.map(() => new Array<number>(K).fill(0));
  const accepted: number[] = [];
  const basis: Float64Array[] = [];
  const basisFor = (): void => {
    // orthonormal basis of the accepted columns, built only when a column needs confirming
    if (basis.length === accepted.length) return;
    basis.length = 0;
    for (const a of accepted) basis.push(orthogonalise(dividedBy(cols[a]!, norms[a]!), basis, T, true)!);
  };
  eq.regressors.forEach((reg, j) => {
    const what = describeRegressor(reg.name, eq.name, layout);
    if (!(norms[j]! > 0)) throw new EstimationInputError(`${what} is zero in every row, so the ${eq.name} equation cannot be estimated`);
    // pivot of column j against the accepted ones (scaled Gram, so pivots lie in [0, 1])
    let d = G[j]![j]!;
    const row = L[j]!;
    accepted.forEach((a, c) => {
      let acc = G[j]![a]!;
      for (let l = 0; l < c; l++) acc -= row[l]! * L[a]![l]!;
      row[c] = acc / L[a]![c]!;
      d -= row[c]! ** 2;
    });
    let dependent = false;
    if (d < 1e-9) {
      basisFor();
      dependent = orthogonalise(dividedBy(cols[j]!, norms[j]!), basis, T, false) === null;
    }
    if (!dependent) {
      // keep L consistent: recompute the pivot from the data when the Gram value is unreliable
      const pivot = d < 1e-9 ? residualNorm2(cols[j]!, norms[j]!, basis, T) : d;
      // L is stored by column index (row j), entries by position among the accepted columns
      L[j]![accepted.length] = Math.sqrt(pivot);
      accepted.push(j);
      if (basis.length === accepted.length - 1 && basis.length > 0) basis.push(orthogonalise(dividedBy(cols[j]!, norms[j]!), basis, T, true)!);
      return;
    }
    {
      const x = cols[j]!;
      const norm = norms[j]!;
      const X = new Matrix(T, accepted.length);
      accepted.forEach((a, c) => {
        for (let t = 0; t < T; t++) X.set(t, c, eq.regressors[a]!.values[t]!);
      });
      const coef = new QrDecomposition(X).solve(Matrix.columnVector(Array.from(x))).to1DArray();
      const involved = accepted
        .filter((a, c) => {
          const col = eq.regressors[a]!.values;
          let ss = 0;
          for (let t = 0; t < T; t++) ss += col[t]! ** 2;
          return Math.abs(coef[c]!) * Math.sqrt(ss) > 1e-7 * norm;
        })
        .map((a) => describeRegressor(eq.regressors[a]!.name, eq.name, layout));
      const isPrice = /^(p_|s_|hp_)/.test(reg.name) || involved.some((d) => d.startsWith('price:'));
      throw new EstimationInputError(
        `${isPrice ? 'perfectly collinear prices' : 'perfectly collinear regressors'}: ${what} is an exact linear function of ${involved.join(', ') || 'the other columns'} (in the ${eq.name} equation)`,
      );
    }
  });
}

/** x / d element by element, into a new array (a plain loop: a mapping callback per element is slow on long panels). */
function dividedBy(x: Float64Array, d: number): Float64Array {
  const out = new Float64Array(x.length);
  for (let t = 0; t < x.length; t++) out[t] = x[t]! / d;
  return out;
}

/** Remove the components along an orthonormal basis (twice); null when nothing is left (< 1e-10). */
function orthogonalise(v: Float64Array, basis: Float64Array[], T: number, force: boolean): Float64Array | null {
  for (let pass = 0; pass < 2; pass++)
    for (const q of basis) {
      const c = dot(q, v);
      for (let t = 0; t < T; t++) v[t]! -= c * q[t]!;
    }
  const r = Math.sqrt(dot(v, v));
  if (r < 1e-10 && !force) return null;
  for (let t = 0; t < T; t++) v[t]! /= r || 1;
  return v;
}

function residualNorm2(x: Float64Array, norm: number, basis: Float64Array[], T: number): number {
  const v = dividedBy(x, norm);
  for (let pass = 0; pass < 2; pass++)
    for (const q of basis) {
      const c = dot(q, v);
      for (let t = 0; t < T; t++) v[t]! -= c * q[t]!;
    }
  return dot(v, v);
}
