/**
 * Result shapes of the estimation engine (server/estimation) that the API answers with and the
 * screens read: plain data, no Node imports, so the client and the server share one declaration.
 */

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
