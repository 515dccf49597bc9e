/**
 * The parts of a forecast draw shared by every farm (docs/forecasting.md §6): per draw s
 *   θ_s = θ̂ + C_f ε_s + √v_s C_λ ε'_s        parameter uncertainty (farm-level and season parts)
 *   λ_s = √v_s Σ_λ^{1/2} z_s                  the season shock, shared by every farm, joint across items
 *   v_s = ν / χ²_ν                            the Student t scale of both season parts (ν ≈ seasons − 1)
 * and optionally a price-error scenario index. Used by the projection (forecast.ts) and by the
 * contracted-output evaluation (contracted.ts), so both carry the same uncertainty.
 */
import { checkConvexity } from './curvature.js';
import { formOf } from './forms.js';
import { psdFactor } from './linalg.js';
import type { ForecastModel } from './panel.js';
import { SeededRandom } from './random.js';

export interface SharedDrawOptions {
  draws: number;
  seed: number;
  /** Include parameter uncertainty (default true). */
  parameterUncertainty?: boolean;
  /** Number of price-error scenarios; when given (price risk), each draw picks one uniformly. */
  scenarios?: number;
  /**
   * How the season parts carry their few degrees of freedom: 'mixture' (default) multiplies them by
   * √v_s, v_s = ν/χ²_ν, in every draw (a Bayesian scale mixture); 'plug-in' draws them at the
   * estimated scale, for a caller that widens each quantity by its own Welch–Satterthwaite t
   * afterwards (the projection, forecast.ts; docs/forecasting.md §6).
   */
  seasonScale?: 'mixture' | 'plug-in';
}

export interface SharedDraws {
  draws: number;
  /** θ_s for draw s at [s·k, (s+1)·k). */
  theta: Float64Array;
  /** λ_s (season shock per item, layout order) for draw s at [s·n, (s+1)·n); zeros without season effects. */
  lambda: Float64Array;
  /** Price-error scenario of each draw (all 0 without price risk). */
  scenario: Int32Array;
  /** Draws whose parameters violate convexity (0 without parameter uncertainty). */
  curvatureViolations: number;
  /** The generator, positioned after the shared draws: farm-level normals continue from it. */
  rng: SeededRandom;
}

/** Draw the shared parts of S forecast draws from the model's parameter and season-shock uncertainty. */
export function drawSharedParts(model: ForecastModel, options: SharedDrawOptions): SharedDraws {
  const { fit } = model;
  const { layout } = fit;
  const form = formOf(layout.form);
  const n = layout.items.length;
  const k = fit.theta.length;
  const S = options.draws;
  const K = options.scenarios ?? 0;
  const rng = new SeededRandom(options.seed);
  const withParams = options.parameterUncertainty ?? true;
  const Cf = withParams ? psdFactor(model.parameterCovariance.idiosyncratic) : null;
  const Cs = withParams && model.seasonEffects ? psdFactor(model.parameterCovariance.season) : null;
  const seasonFx = model.seasonEffects;
  const Cl = seasonFx ? psdFactor(seasonFx.covariance) : null;
  const nu = seasonFx && options.seasonScale !== 'plug-in' ? seasonFx.df : Infinity;
  const thetaDraws = new Float64Array(S * k);
  const lambdaDraws = new Float64Array(S * n);
  const scenarioOf = new Int32Array(S);
  const e1 = new Float64Array(k);
  const e2 = new Float64Array(k);
  const zl = new Float64Array(n);
  let violations = 0;
  const block = form.curvatureBlock(layout, fit.referencePrices);
  const thetaView = new Array<number>(k);
  for (let s = 0; s < S; s++) {
    const v = Number.isFinite(nu) ? nu / chiSquare(rng, nu) : 1;
    const sv = Math.sqrt(v);
    if (Cf) rng.fillNormals(e1);
    if (Cs) rng.fillNormals(e2);
    if (Cl) rng.fillNormals(zl);
    const o = s * k;
    for (let a = 0; a < k; a++) {
      let acc = fit.theta[a]!;
      if (Cf) {
        const row = Cf[a]!;
        for (let b = 0; b < k; b++) acc += row[b]! * e1[b]!;
      }
      if (Cs) {
        const row = Cs[a]!;
        let t = 0;
        for (let b = 0; b < k; b++) t += row[b]! * e2[b]!;
        acc += sv * t;
      }
      thetaDraws[o + a] = acc;
      thetaView[a] = acc;
    }
    if (Cl)
      for (let i = 0; i < n; i++) {
        let acc = 0;
        for (let j = 0; j < n; j++) acc += Cl[i]![j]! * zl[j]!;
        lambdaDraws[s * n + i] = sv * acc;
      }
    scenarioOf[s] = K > 0 ? Math.min(K - 1, Math.floor(rng.uniform() * K)) : 0;
    if (withParams && !checkConvexity(block.toMatrix(thetaView)).convex) violations++;
  }
  return { draws: S, theta: thetaDraws, lambda: lambdaDraws, scenario: scenarioOf, curvatureViolations: violations, rng };
}

/** χ²_ν = 2·Gamma(ν/2) by Marsaglia & Tsang (2000), with the boost for shape < 1. */
export function chiSquare(rng: SeededRandom, nu: number): number {
  return 2 * gammaDraw(rng, nu / 2);
}

function gammaDraw(rng: SeededRandom, shape: number): number {
  if (shape < 1) return gammaDraw(rng, shape + 1) * Math.pow(rng.uniform() || 1e-300, 1 / shape);
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = rng.normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.uniform();
    if (u < 1 - 0.0331 * x * x * x * x) return d * v;
    if (Math.log(u || 1e-300) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v;
  }
}
