/**
 * Result shapes of the estimation engine (server/estimation) that the API answers with and the
 * screens read: plain data, no Node imports, so the client and the server share one declaration.
 */
import type { BackTestResult, ForecastModel, ForecastSpec } from './forecast-types.js';

/**
 * First-order (Karush–Kuhn–Tucker) conditions of the convexity-constrained maximum likelihood
 * problem, min f = −ℓ over θ subject to C ⪰ 0, at the reported estimate (docs/profit-functions.md
 * §7.3). Measures are in log-likelihood units per standard error, so 1e-6 means a
 * one-standard-error move changes the log-likelihood by about 1e-6 at first order.
 */
export interface OptimalityCheck {
  /** max_j |∂f/∂θ_j|·SE_j over the parameters outside C (0 at a stationary point). */
  stationarity: number;
  /**
   * Smallest eigenvalue of the multiplier Λ = ∂f/∂C rescaled by D = diag(standard errors of the
   * C_aa), Λ̃ = DΛD (≥ 0 at a KKT point: dual feasibility).
   */
  dualMinEigenvalue: number;
  /**
   * Complementary slackness Λ C = 0: the gradient along the face of C's rank (C = L L′, Λ L = 0),
   * as a Newton decrement √(g′ I⁺ g) in the coordinates of L (0 at a KKT point).
   */
  complementarity: number;
  /** Smallest eigenvalue of C̃ = D⁻¹CD⁻¹ over max(1, ‖C̃‖) (≥ 0: primal feasibility). */
  primalMinEigenvalue?: number;
  /** Bound every measure must meet. */
  tolerance?: number;
  /** All four conditions hold within the tolerance; when false the fit did not converge. */
  satisfied?: boolean;
}

export interface CoefficientEstimate {
  /** systemfit-style name `<equation>_<regressor>`. */
  name: string;
  /** Structural parameter carried (e.g. `b[wheat,canola]`). */
  parameter: string;
  estimate: number;
  standardError: number;
}

export interface EquationFit {
  item: string;
  role: 'output' | 'input';
  r2: number;
  rmse: number;
  ssr: number;
  coefficients: CoefficientEstimate[];
}

export interface CurvatureReport {
  /** True when convexity at one point implies it everywhere (NQ). */
  global: boolean;
  /** Eigenvalues of the curvature block at the sample-mean prices, before any imposition. */
  unrestrictedEigenvalues: number[];
  unrestrictedConvex: boolean;
  imposed: boolean;
  /** Eigenvalues of the curvature block at the sample-mean prices in the reported fit. */
  eigenvalues: number[];
  convexAtMeans: boolean;
  /** Observations whose price Hessian is not positive semidefinite (reported fit). */
  violatingObservations: number;
  violationShare: number;
  /** When imposed: the constraint ends on the boundary (a zero eigenvalue). */
  binding?: boolean;
  /** When imposed: first-order optimality diagnostics of the constrained fit. */
  optimality?: OptimalityCheck;
  iterations?: number;
  converged?: boolean;
}

/** Summary of projected quantities: supply for outputs, demand for inputs (both positive). */
export interface QuantitySummary {
  /** At θ̂ without residuals. */
  point: number;
  mean: number;
  sd: number;
  median: number;
  p5: number;
  p95: number;
}

export type FormName = 'normalized-quadratic' | 'generalized-leontief';

/** An item of the netput system: an output (supplied, netput > 0) or an input (demanded, netput < 0). */
export interface NetputRef {
  name: string;
  role: 'output' | 'input';
}

export interface ModelLayout {
  form: FormName;
  /** Items in the order of every vector and matrix: non-numeraire items in file order, numeraire last. */
  items: NetputRef[];
  numeraire: string;
  /** Fixed factors in file order, then "trend" when a trend is fitted. */
  factors: string[];
  /** The first `quadraticFactors` factors also enter quadratically (all but the trend). */
  quadraticFactors: number;
  /** Trend = season year − originYear + 1, when a trend is fitted. */
  trendOrigin: number | null;
  /** Names of the structural parameters θ, in order. */
  parameterNames: string[];
}

export interface MonotonicityReport {
  item: string;
  role: NetputRef['role'];
  /** Observations whose fitted netput has the wrong sign (output ≤ 0 or input ≥ 0). */
  violations: number;
  share: number;
}

/** A fitted profit function: plain JSON, safe to post to a worker thread or store. */
export interface FitResult {
  layout: ModelLayout;
  observations: number;
  /** Structural parameter estimates θ, named by layout.parameterNames. */
  theta: number[];
  /** Cov(θ̂) (delta method through L when convexity was imposed). */
  covariance: number[][];
  standardErrors: number[];
  /** Residual covariance Σ̂ (divisor T) from the final residuals, layout item order. */
  sigma: number[][];
  residualCorrelation: number[][];
  equations: EquationFit[];
  /** Gaussian log-likelihood at Σ̂: −T/2·(n·ln 2π + ln|Σ̂| + n). */
  logLikelihood: number;
  /** Number of free coefficients (length of θ). */
  parameterCount: number;
  /** −2ℓ + 2k and −2ℓ + k·ln T, with k the free coefficients (Σ̂ not counted). */
  aic: number;
  bic: number;
  iterations: number;
  converged: boolean;
  /** First and last season year in the data (a projection's trend defaults to last + 1). */
  seasonYears: { first: number; last: number };
  /** Sample means (layout order): the default evaluation point. */
  means: { prices: number[]; fixed: number[] };
  /** Prices the GL curvature block is defined at (the sample means). */
  referencePrices: number[];
  curvature: CurvatureReport;
  monotonicity: MonotonicityReport[];
  /** Share of observations with at least one wrong-signed fitted netput. */
  monotonicityViolationShare: number;
  warnings: string[];
}

/** One back-tested season of a model run (server/jobs/fit-task.ts). */
export interface BacktestSeason {
  season: string;
  /** Co-op totals (quantities ≥ 0 in item units) predicted at the prices actually seen, and actual. */
  predicted: Record<string, number>;
  actual: Record<string, number>;
  fittedOn: { first: string; last: string; observations: number };
}

export interface BacktestItem {
  item: string;
  /** Mean absolute percentage error over the back-tested seasons, in %. */
  mape: number;
  /** Mean of (predicted − actual) / actual, in % (positive: the model over-projects). */
  bias: number;
}

/** An evaluation point with every price and factor level filled in (server/estimation/results.ts). */
export interface ResolvedPoint {
  /** Layout item order. */
  prices: number[];
  /** Layout factor order (the trend last, when fitted). */
  fixed: number[];
}

/** The n×n price-elasticity matrix at a point with delta-method standard errors (`elasticitiesAt`). */
export interface ElasticityResult {
  items: string[];
  point: ResolvedPoint;
  /** Fitted netputs at the point (the y in e_ij = ∂y_i/∂p_j · p_j / y_i). */
  netputs: number[];
  /** [i][j] = ∂ln|y_i|/∂ln p_j; every row sums to zero (homogeneity). */
  elasticities: number[][];
  standardErrors: number[][];
}

/** Shadow value ∂π/∂z of one fixed factor at a point (`shadowValues`). */
export interface ShadowValue {
  factor: string;
  /** ∂π/∂z in money per unit of the factor (e.g. the value of one more hectare). */
  value: number;
  standardError: number;
  /** Elasticity of profit with respect to the factor, ∂ln π/∂ln z. */
  profitElasticity: number;
}

/** Response when fixed factors adjust to their rental rates (`longRunResponse`). */
export interface LongRunResult {
  items: string[];
  factors: string[];
  rentalRates: number[];
  /** Long-run levels z* solving ∂π/∂z = rental rate. */
  levels: number[];
  /** Netputs at (p, z*), where short and long run coincide. */
  netputs: number[];
  /** Short-run elasticities at (p, z*), factors held at z*. */
  shortRun: number[][];
  /** Long-run elasticities at (p, z*), factors adjusting, rental rates held. */
  longRun: number[][];
  longRunStandardErrors: number[][];
  /** ∂ln z*_k/∂ln p_j. */
  factorElasticities: number[][];
}

/**
 * The fit command's JSON document (docs/fit-command.md §3; `fitToContractJson` in
 * server/estimation/contract.ts), also stored as a run's `summary`. The keys of the contract come
 * first (form … equations), then details; the fit statistics (log-likelihood … warnings) are the
 * fit's own.
 */
export interface FitSummary
  extends Pick<FitResult, 'logLikelihood' | 'parameterCount' | 'aic' | 'bic' | 'iterations' | 'converged' | 'warnings'> {
  form: FormName;
  numeraire: string;
  items: NetputRef[];
  observations: number;
  evaluatedAt: { prices: Record<string, number>; fixed: Record<string, number> };
  netputs: Record<string, number>;
  profit: number;
  elasticities: number[][];
  elasticityStandardErrors: number[][];
  convex: boolean;
  curvatureImposed: boolean;
  equations: { item: string; r2: number; rmse: number }[];
  fixedFactors: string[];
  trend: { firstSeason: number; definition: string } | null;
  hessianEigenvalues: number[];
  curvature: CurvatureReport;
  monotonicity: { violationShare: number; byItem: Record<string, number> };
  shadowValues: Record<string, { value: number; standardError: number }>;
  /** Every equation's coefficients, in equation order. */
  coefficients: CoefficientEstimate[];
  /** The fit's Σ̂ and its correlations (layout item order). */
  residualCovariance: number[][];
  residualCorrelation: number[][];
  /** The caution every result carries (not financial advice; a certified adviser has the last word). */
  caution: string;
}

/**
 * A model run's result as the fit worker returns it (`runFit` in server/jobs/fit-task.ts), stored
 * with the run and answered by GET /api/model-runs/:id.
 */
export interface FitRunResult {
  /** The profit function fitted on every observation. */
  fit: FitResult;
  /** The fit document at the sample means. */
  summary: FitSummary;
  elasticities: ElasticityResult;
  shadowValues: ShadowValue[];
  longRun: LongRunResult | null;
  longRunError: string | null;
  /** Per season: co-op totals, actual and fitted (quantities ≥ 0). */
  fittedBySeason: { season: string; actual: Record<string, number>; fitted: Record<string, number> }[];
  /** Per observation: residual (actual − fitted quantity) of every item. */
  residuals: { season: string; farm: string | null; fitted: Record<string, number>; residual: Record<string, number> }[];
  /** Each netput against its own price, other prices at their means. */
  responseCurves: { item: string; prices: number[]; quantities: number[] }[];
  backtest: { seasons: BacktestSeason[]; items: BacktestItem[]; error: string | null };
  /**
   * The forecasting model's specification. This and the three fields after it are absent in runs
   * stored before forecasting models existed.
   */
  spec?: ForecastSpec;
  /**
   * The forecasting model of the chosen specification, fitted on every season (null when it failed:
   * see forecastError). For a per-hectare run its `fit` is the profit function per hectare of land
   * (netputs per ha; land itself is not a factor).
   */
  forecast?: ForecastModel | null;
  forecastError?: string | null;
  /** The rolling-origin back-test of the forecasting model against the plain rules, with band coverage. */
  skill?: BackTestResult | null;
  /**
   * Per-hectare runs: the price elasticities of the per-hectare profit function at its sample means
   * (with constant returns to land they hold for a farm of any size); null otherwise (absent in
   * older runs).
   */
  forecastElasticities?: { elasticities: number[][]; standardErrors: number[][] } | null;
}
