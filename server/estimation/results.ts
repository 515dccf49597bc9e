/**
 * What a fit says at a point: netputs and profit, the price Hessian and elasticities with
 * delta-method standard errors, the shadow values of the fixed factors, and the long-run response
 * when fixed factors adjust to their rental rates.
 */
import { checkConvexity, leadingBlock } from './curvature.js';
import { EstimationInputError } from './errors.js';
import type { ElasticityResult, LongRunResult, ResolvedPoint, ShadowValue } from '../../shared/estimation-types.js';
import type { FitResult } from './fit.js';
import { formOf } from './forms.js';
import { solve, zeros, type Mat } from './linalg.js';
import { factorGradient, factorHessian, netputFactorDerivatives, netputsFromDecomposition, profitFromNetputs } from './model.js';

export type { ElasticityResult, LongRunResult, ResolvedPoint, ShadowValue } from '../../shared/estimation-types.js';

/** Prices and fixed-factor levels by name; anything not named stays at its sample mean. */
export interface EvaluationPoint {
  prices?: Record<string, number>;
  fixed?: Record<string, number>;
}

/** Fill a partial point with the sample means and check names and values. */
export function resolvePoint(fit: FitResult, point: EvaluationPoint = {}): ResolvedPoint {
  const { items, factors } = fit.layout;
  const prices = fit.means.prices.slice();
  const fixed = fit.means.fixed.slice();
  for (const [name, v] of Object.entries(point.prices ?? {})) {
    const i = items.findIndex((it) => it.name === name);
    if (i < 0) throw new EstimationInputError(`prices: "${name}" is not an item of the model (items: ${items.map((x) => x.name).join(', ')})`);
    if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`prices: the price of ${name} must be a positive number, got ${v}`);
    prices[i] = v;
  }
  for (const [name, v] of Object.entries(point.fixed ?? {})) {
    const k = factors.indexOf(name);
    if (k < 0)
      throw new EstimationInputError(`fixed: "${name}" is not a fixed factor of the model (${factors.length ? `factors: ${factors.join(', ')}` : 'it has none'})`);
    if (!Number.isFinite(v)) throw new EstimationInputError(`fixed: the level of ${name} must be a number, got ${v}`);
    fixed[k] = v;
  }
  return { prices, fixed };
}

function netputsAt(fit: FitResult, theta: ArrayLike<number>, p: ResolvedPoint): number[] {
  return netputsFromDecomposition(formOf(fit.layout.form).decompose(fit.layout, theta, p.prices), p.fixed);
}

export interface Evaluation {
  point: ResolvedPoint;
  /** Netputs by layout order: + output supply, − input demand. */
  netputs: number[];
  profit: number;
  /** Price Hessian positive semidefinite at this point. */
  convex: boolean;
  /** Eigenvalues of the price Hessian (ascending; one is structurally zero). */
  hessianEigenvalues: number[];
}

/** Netputs, profit and the convexity check at a point (default: the sample means). */
export function evaluateFit(fit: FitResult, point: EvaluationPoint = {}): Evaluation {
  const p = resolvePoint(fit, point);
  const y = netputsAt(fit, fit.theta, p);
  const H = formOf(fit.layout.form).priceHessian(fit.layout, fit.theta, p.prices);
  return {
    point: p,
    netputs: y,
    profit: profitFromNetputs(p.prices, y),
    convex: checkConvexity(leadingBlock(H)).convex,
    hessianEigenvalues: checkConvexity(H).eigenvalues,
  };
}

/** ∂²π/∂p∂p' at a point. */
export function priceHessianAt(fit: FitResult, point: EvaluationPoint = {}): Mat {
  return formOf(fit.layout.form).priceHessian(fit.layout, fit.theta, resolvePoint(fit, point).prices);
}

/**
 * Delta method: the value of f at θ̂ and its standard errors √diag(J V J'), with J by central
 * differences (step 1e-6 relative to max(|θ_k|, SE_k)).
 */
export function deltaMethod(fit: FitResult, f: (theta: number[]) => number[]): { value: number[]; standardErrors: number[] } {
  const theta = fit.theta;
  const value = f(theta);
  const k = theta.length;
  const J: Mat = value.map(() => new Array<number>(k).fill(0));
  for (let j = 0; j < k; j++) {
    if (!(fit.covariance[j]![j]! > 0)) continue;
    const h = 1e-6 * Math.max(Math.abs(theta[j]!), fit.standardErrors[j]!, 1e-12);
    const up = theta.slice();
    const dn = theta.slice();
    up[j]! += h;
    dn[j]! -= h;
    const fu = f(up);
    const fd = f(dn);
    for (let r = 0; r < value.length; r++) J[r]![j] = (fu[r]! - fd[r]!) / (2 * h);
  }
  const V = fit.covariance;
  const standardErrors = J.map((row) => {
    let s = 0;
    for (let a = 0; a < k; a++) {
      if (row[a] === 0) continue;
      let t = 0;
      for (let b = 0; b < k; b++) t += V[a]![b]! * row[b]!;
      s += row[a]! * t;
    }
    return Math.sqrt(Math.max(s, 0));
  });
  return { value, standardErrors };
}

function elasticityMatrix(H: Mat, p: number[], y: number[]): Mat {
  return H.map((row, i) => row.map((h, j) => (h * p[j]!) / y[i]!));
}


/** The full n×n price-elasticity matrix (numeraire row and column included) with delta-method SEs. */
export function elasticitiesAt(fit: FitResult, point: EvaluationPoint = {}): ElasticityResult {
  const p = resolvePoint(fit, point);
  const form = formOf(fit.layout.form);
  const n = fit.layout.items.length;
  const f = (theta: number[]): number[] => {
    const y = netputsAt(fit, theta, p);
    return elasticityMatrix(form.priceHessian(fit.layout, theta, p.prices), p.prices, y).flat();
  };
  const { value, standardErrors } = deltaMethod(fit, f);
  const reshape = (v: number[]): Mat => Array.from({ length: n }, (_, i) => v.slice(i * n, (i + 1) * n));
  return {
    items: fit.layout.items.map((i) => i.name),
    point: p,
    netputs: netputsAt(fit, fit.theta, p),
    elasticities: reshape(value),
    standardErrors: reshape(standardErrors),
  };
}


/** Shadow value ∂π/∂z_k of every fixed factor (trend included) at a point, with delta-method SEs. */
export function shadowValues(fit: FitResult, point: EvaluationPoint = {}): ShadowValue[] {
  const p = resolvePoint(fit, point);
  const form = formOf(fit.layout.form);
  const { value, standardErrors } = deltaMethod(fit, (theta) => factorGradient(form.decompose(fit.layout, theta, p.prices), p.prices, p.fixed));
  const profit = profitFromNetputs(p.prices, netputsAt(fit, fit.theta, p));
  return fit.layout.factors.map((factor, k) => ({
    factor,
    value: value[k]!,
    standardError: standardErrors[k]!,
    profitElasticity: (value[k]! * p.fixed[k]!) / profit,
  }));
}

export interface LongRunOptions {
  /**
   * Rental rate (money per unit per season) of each factor allowed to adjust. Default: one factor
   * per entry of `adjust`, at its shadow value at the point, so that the factor is already at its
   * long-run level there and the two sets of elasticities describe the same point.
   */
  rentalRates?: Record<string, number>;
  /** Factors that adjust when `rentalRates` is not given (default: every fixed factor, never the trend). */
  adjust?: string[];
  point?: EvaluationPoint;
}


/**
 * Long-run response when fixed factors adjust so that ∂π/∂z = r. With H_zz = ∂²π/∂z² negative
 * definite, z* moves with prices as −H_zz⁻¹ ∂²π/∂z∂p' and the long-run price Hessian is
 *   H_LR = H_pp − H_pz H_zz⁻¹ H_zp,
 * the short-run one plus a positive semidefinite term (Le Chatelier: own-price responses grow).
 * @throws EstimationInputError when profit is not concave in the adjusting factors
 */
export function longRunResponse(fit: FitResult, options: LongRunOptions = {}): LongRunResult {
  const p0 = resolvePoint(fit, options.point ?? {});
  const { layout } = fit;
  const form = formOf(layout.form);
  const quad = layout.factors.slice(0, layout.quadraticFactors);
  const names = options.rentalRates ? Object.keys(options.rentalRates) : (options.adjust ?? quad);
  if (names.length === 0) throw new EstimationInputError('long run: the model has no fixed factor that can adjust');
  const idxs = names.map((nm) => {
    const k = quad.indexOf(nm);
    if (k < 0) throw new EstimationInputError(`long run: "${nm}" is not a fixed factor that can adjust (${quad.length ? quad.join(', ') : 'none'})`);
    return k;
  });
  const d0 = form.decompose(layout, fit.theta, p0.prices);
  const rates = options.rentalRates ? names.map((nm) => options.rentalRates![nm]!) : idxs.map((k) => factorGradient(d0, p0.prices, p0.fixed)[k]!);

  const solveLevels = (theta: ArrayLike<number>): { z: number[]; Hzz: Mat } => {
    const d = form.decompose(layout, theta, p0.prices);
    const Hfull = factorHessian(d, p0.prices);
    const Hzz = idxs.map((a) => idxs.map((b) => Hfull[a]![b]!));
    const z = p0.fixed.slice();
    // ∂π/∂z is linear in z for both forms: one Newton step solves it; a second polishes rounding.
    for (let it = 0; it < 2; it++) {
      const g = factorGradient(d, p0.prices, z);
      const step = solve(Hzz, idxs.map((k, a) => rates[a]! - g[k]!));
      idxs.forEach((k, a) => (z[k]! += step[a]!));
    }
    return { z, Hzz };
  };
  const { Hzz } = solveLevels(fit.theta);
  const eig = checkConvexity(Hzz.map((r) => r.map((v) => -v)));
  if (!eig.convex || eig.minEigenvalue <= 0)
    throw new EstimationInputError(
      `long run: profit is not concave in ${names.join(', ')} at these prices (∂²π/∂z² has eigenvalue ${(-eig.minEigenvalue).toPrecision(4)} ≥ 0), so there is no long-run optimum`,
    );

  const compute = (theta: number[]): { y: number[]; sr: Mat; lr: Mat; fe: Mat; z: number[] } => {
    const { z, Hzz: hzz } = solveLevels(theta);
    const d = form.decompose(layout, theta, p0.prices);
    const y = netputsFromDecomposition(d, z);
    const Hpp = form.priceHessian(layout, theta, p0.prices);
    const dy = netputFactorDerivatives(d, z); // n × m, = ∂²π/∂p∂z'
    const Hpz = dy.map((row) => idxs.map((k) => row[k]!));
    const n = y.length;
    // X = H_zz⁻¹ H_zp  (|A| × n)
    const cols = Array.from({ length: n }, (_, j) => solve(hzz, Hpz[j]!));
    const dzdp = idxs.map((_, a) => cols.map((c) => -c[a]!)); // ∂z*/∂p_j
    const Hlr = zeros(n, n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) {
        let s = Hpp[i]![j]!;
        for (let a = 0; a < idxs.length; a++) s += Hpz[i]![a]! * dzdp[a]![j]!;
        Hlr[i]![j] = s;
      }
    const fe = idxs.map((k, a) => dzdp[a]!.map((v, j) => (v * p0.prices[j]!) / z[k]!));
    return { y, sr: elasticityMatrix(Hpp, p0.prices, y), lr: elasticityMatrix(Hlr, p0.prices, y), fe, z };
  };
  const base = compute(fit.theta);
  const n = layout.items.length;
  const { standardErrors } = deltaMethod(fit, (theta) => compute(theta).lr.flat());
  return {
    items: layout.items.map((i) => i.name),
    factors: names,
    rentalRates: rates,
    levels: idxs.map((k) => base.z[k]!),
    netputs: base.y,
    shortRun: base.sr,
    longRun: base.lr,
    longRunStandardErrors: Array.from({ length: n }, (_, i) => standardErrors.slice(i * n, (i + 1) * n)),
    factorElasticities: base.fe,
  };
}
