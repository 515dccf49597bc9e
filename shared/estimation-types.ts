/**
 * Result shapes of the estimation engine (server/estimation) that the API answers with and the
 * screens read: plain data, no Node imports, so the client and the server share one declaration.
 */

export interface OptimalityCheck {
  /** max_j |∂f/∂θ_j|·SE_j over the parameters outside C (0 at a stationary point; objective units). */
  stationarity: number;
  /** Smallest eigenvalue of the multiplier Λ = ∂f/∂C over its largest |eigenvalue| (≥ 0 at a KKT point). */
  dualMinEigenvalue: number;
  /** tr(ΛC)/(‖Λ‖·‖C‖) (0 at a KKT point: the multiplier acts only on the binding directions). */
  complementarity: number;
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
