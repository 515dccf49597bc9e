/**
 * The JSON document of the fit command (docs/fit-command.md §3), also returned by the API.
 */
import type { FitSummary } from '../../shared/estimation-types.js';
import type { FitResult } from './fit.js';
import { elasticitiesAt, evaluateFit, shadowValues, type EvaluationPoint } from './results.js';

export const FIT_CAUTION =
  'Estimates from past prices and quantities, conditional on the stated prices; not financial advice. Fertiliser rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.';

const byName = (names: string[], values: number[]): Record<string, number> => Object.fromEntries(names.map((n, i) => [n, values[i]!]));

/**
 * The contract JSON for a fit at an evaluation point (default: the sample means). Keys of the
 * contract first (form, numeraire, items, observations, evaluatedAt, netputs, profit,
 * elasticities, elasticityStandardErrors, convex, curvatureImposed, equations), then details.
 */
export function fitToContractJson(fit: FitResult, point: EvaluationPoint = {}): FitSummary {
  const { layout } = fit;
  const items = layout.items.map((i) => i.name);
  const ev = evaluateFit(fit, point);
  const el = elasticitiesAt(fit, point);
  const sv = shadowValues(fit, point);
  return {
    form: layout.form,
    numeraire: layout.numeraire,
    items: layout.items.map((i) => ({ name: i.name, role: i.role })),
    observations: fit.observations,
    evaluatedAt: { prices: byName(items, ev.point.prices), fixed: byName(layout.factors, ev.point.fixed) },
    netputs: byName(items, ev.netputs),
    profit: ev.profit,
    elasticities: el.elasticities,
    elasticityStandardErrors: el.standardErrors,
    convex: ev.convex,
    curvatureImposed: fit.curvature.imposed,
    equations: fit.equations.map((e) => ({ item: e.item, r2: e.r2, rmse: e.rmse })),
    fixedFactors: layout.factors,
    trend: layout.trendOrigin === null ? null : { firstSeason: layout.trendOrigin, definition: 'season year − first season year + 1' },
    hessianEigenvalues: ev.hessianEigenvalues,
    curvature: fit.curvature,
    monotonicity: {
      violationShare: fit.monotonicityViolationShare,
      byItem: Object.fromEntries(fit.monotonicity.map((m) => [m.item, m.share])),
    },
    shadowValues: Object.fromEntries(sv.map((s) => [s.factor, { value: s.value, standardError: s.standardError }])),
    coefficients: fit.equations.flatMap((e) => e.coefficients),
    residualCovariance: fit.sigma,
    residualCorrelation: fit.residualCorrelation,
    logLikelihood: fit.logLikelihood,
    parameterCount: fit.parameterCount,
    aic: fit.aic,
    bic: fit.bic,
    iterations: fit.iterations,
    converged: fit.converged,
    warnings: fit.warnings,
    caution: FIT_CAUTION,
  };
}

/** The document's shape, declared once for the server and the screens. */
export type FitContractJson = FitSummary;
