/**
 * Vector least squares with the Levenberg–Marquardt implementation of ml-levenberg-marquardt.
 * The package fits y ≈ f(x; θ) point by point; a general residual vector is passed to it by using
 * the observation index as x, with the model and its analytic Jacobian evaluated once per
 * parameter vector and cached.
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import type { Mat } from './linalg.js';

export interface LeastSquaresProblem {
  /** Observed values (length N). */
  target: ArrayLike<number>;
  /** Model values at the parameters (length N). */
  model(params: number[]): ArrayLike<number>;
  /** ∂model_i/∂params_j (N × P), analytic. */
  jacobian(params: number[]): Mat;
}

export interface LeastSquaresOptions {
  /** Initial damping λ (the package adds λ·I to J'J). */
  damping?: number;
  maxIterations?: number;
  /** The package stops early only when RSS ≤ errorTolerance; 0 runs all iterations and keeps the best. */
  errorTolerance?: number;
  /**
   * Optimise in the variables params_j / scale_j (defaults to 1). Choosing scale_j = 1/‖J_col j‖
   * at the start makes the package's λ·I damping act like Marquardt's diagonal scaling.
   */
  scales?: number[];
}

export interface LeastSquaresResult {
  parameters: number[];
  rss: number;
  iterations: number;
}

export function fitLeastSquares(problem: LeastSquaresProblem, start: number[], options: LeastSquaresOptions = {}): LeastSquaresResult {
  const N = problem.target.length;
  const scales = options.scales ?? start.map(() => 1);
  const unscale = (u: number[]): number[] => u.map((v, j) => v * scales[j]!);
  let lastKey: number[] | null = null;
  let lastModel: ArrayLike<number> = [];
  let lastJacKey: number[] | null = null;
  let lastJac: Mat = [];
  // The package updates its parameter array in place, so cache by value, not by reference.
  const same = (a: number[] | null, b: number[]): boolean => a !== null && a.length === b.length && a.every((v, i) => v === b[i]);
  const model = (u: number[]): ArrayLike<number> => {
    if (!same(lastKey, u)) {
      lastModel = problem.model(unscale(u));
      lastKey = u.slice();
    }
    return lastModel;
  };
  const x = Array.from({ length: N }, (_, i) => i);
  const result = levenbergMarquardt(
    { x, y: problem.target },
    (u: number[]) => {
      const v = model(u);
      return (i: number) => v[i]!;
    },
    {
      initialValues: start.map((v, j) => v / scales[j]!),
      damping: options.damping ?? 1e-2,
      maxIterations: options.maxIterations ?? 100,
      errorTolerance: options.errorTolerance ?? 0,
      jacobianFunction: (u: number[]) => {
        if (!same(lastJacKey, u)) {
          const J = problem.jacobian(unscale(u));
          lastJac = J.map((row) => row.map((v, j) => v * scales[j]!));
          lastJacKey = u.slice();
        }
        const J = lastJac;
        return (i: number) => J[i]!;
      },
    },
  );
  const parameters = unscale(result.parameterValues);
  return { parameters, rss: result.parameterError, iterations: result.iterations };
}
