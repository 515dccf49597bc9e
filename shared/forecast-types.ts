/**
 * Result shapes of the forecasting engine (server/estimation/panel.ts, forecast.ts, backtest.ts): the
 * fitted forecasting model, per-farm and co-op predictive bands and the rolling-origin back-test.
 * Plain data shared by the server and the screens.
 */
import type { FitResult, QuantitySummary } from './estimation-types.js';

/** Specification of a forecasting model. */
export type ForecastSpec = 'per-hectare' | 'pooled';

/**
 * A projected quantity (supply for an output, use for an input; never negative). Compatible with
 * QuantitySummary: p5/p95 are always the 5 % and 95 % points; lower/upper are the band at the
 * projection's level ((1 − level)/2 and (1 + level)/2 quantiles), the same as p5/p95 at level 0.9.
 */
export interface ForecastQuantity extends QuantitySummary {
  lower: number;
  upper: number;
}

export interface FarmForecast {
  farm: string;
  /** True when the farm has records in the history the model was fitted to. */
  known: boolean;
  /** Land used (ha), when the model is per hectare. */
  land: number | null;
  quantities: Record<string, ForecastQuantity>;
}

/** What a projection and a contracted evaluation both state about themselves. */
export interface ProjectionHeader {
  spec: ForecastSpec;
  /** Season year projected (trend and labels). */
  season: number;
  /** Band level (e.g. 0.9 for the central 90 %). */
  level: number;
  draws: number;
  seed: number;
  items: { name: string; role: 'output' | 'input' }[];
  /**
   * Prices the farms face when all farms face the same prices (null when they differ); in a
   * contracted evaluation only the inputs and the outputs not committed.
   */
  prices: Record<string, number> | null;
  /** Parameter draws whose price Hessian is not positive semidefinite. */
  curvatureViolationShare: number;
  caution: string;
}

export interface ForecastProjection extends ProjectionHeader {
  farms: FarmForecast[];
  /** Band of the sum over the farms, per draw (the season shock is shared by every farm). */
  coop: Record<string, ForecastQuantity>;
  /** True when draws include the expectation method's past relative price errors. */
  priceRisk: boolean;
  /** Degrees of freedom of the Student t predictive of the season shock (null: no season shock). */
  seasonShockDf: number | null;
}

export interface ErrorSummary {
  /** Median absolute percentage error over farm outcomes with a positive actual (%). */
  mdape: number | null;
  /** Root mean squared error of farm quantities (item units). */
  rmse: number | null;
  /** Mean absolute percentage error of the co-op total over the back-tested seasons (%). */
  coopError: number | null;
  /** Farm outcomes compared. */
  count: number;
}

export interface CoverageCount {
  held: number;
  total: number;
  /** held / total (null when total is 0). */
  share: number | null;
}

export interface BackTestItem {
  item: string;
  role: 'output' | 'input';
  model: ErrorSummary;
  rules: {
    /** Last season's quantity of the farm. */
    lastSeason: ErrorSummary;
    /** The farm's own average quantity per hectare in past seasons × its land (null without land). */
    perHectare: ErrorSummary | null;
  };
  /** Model error over rule error (MdAPE and RMSE; below 1: the model is closer). */
  ratios: {
    lastSeason: { mdape: number | null; rmse: number | null };
    perHectare: { mdape: number | null; rmse: number | null } | null;
  };
  coverage: {
    /** Smallest, middle and largest third of farms by land (by the item's own quantity without land). */
    byThird: [CoverageCount, CoverageCount, CoverageCount];
    farms: CoverageCount;
    coop: CoverageCount;
  };
  /** True when the model's MdAPE is no worse than the per-hectare rule (or, without land, last season's). */
  beatsRule: boolean;
}

export interface BackTestOrigin {
  /** Last season of the fit and the season projected. */
  fittedThrough: string;
  season: string;
  farms: number;
  /** The co-op totals: projected point, band, actual. */
  coop: Record<string, { point: number; lower: number; upper: number; actual: number }>;
  error: string | null;
}

export interface BackTestResult {
  spec: ForecastSpec;
  level: number;
  /** Land-tercile boundaries (ha) used for the thirds, or of the item's quantity without land. */
  thirds: { by: 'land' | 'quantity'; cuts: [number, number] | null };
  origins: BackTestOrigin[];
  items: BackTestItem[];
}

/** A per-hectare model's farm effects: each farm's own level per equation, shrunk towards the co-op's. */
export interface FarmEffects {
  farms: string[];
  /** effects[i][f]: farm f's shrunk own level in equation i (netput per hectare). */
  effects: number[][];
  /** Posterior variance of each effect (w·σ²/T_f). */
  variance: number[][];
  /** Between-farm variance τ_i² (a new farm's effect has mean 0 and this variance). */
  tau2: number[];
  /** Seasons each farm was observed in. */
  seasons: number[];
  /** Each farm's land in its last recorded season (ha). */
  lastLand: number[];
}

/** A per-hectare model's season effects: the shock every farm shared in a season, per equation. */
export interface SeasonEffects {
  seasons: string[];
  years: number[];
  /** effects[i][s]: season s's shared effect in equation i (netput per hectare). */
  effects: number[][];
  /** Covariance of a new season's effect across items (per hectare), scale of the t predictive. */
  covariance: number[][];
  /** Degrees of freedom of the t predictive (seasons less what the fit absorbs; at least 2). */
  df: number;
}

/** How a per-hectare model's residual variance scales with a farm's land. */
export interface ErrorScale {
  /** Land (ha) at which the variances apply (geometric mean of the panel's land). */
  referenceLand: number;
  /** δ_i: per-hectare residual variance ∝ (land / referenceLand)^δ_i. */
  exponent: number[];
  /** σ_i² at the reference land (per hectare, squared). */
  variance: number[];
  /**
   * Sampling variance of log σ̂_i² (2 / its degrees of freedom) and of δ̂_i: the uncertainty of the
   * error-variance function that the bands' Welch–Satterthwaite t counts (docs/forecasting.md §6).
   * Absent in runs stored before 2026-12-03 (then treated as known).
   */
  logVarianceVariance?: number[];
  exponentVariance?: number[];
}

/** A fitted forecasting model: plain JSON, safe to post to a worker thread or store. */
export interface ForecastModel {
  spec: ForecastSpec;
  /** One line in words. */
  specification: string;
  /**
   * The profit function: per hectare for 'per-hectare' (netputs and profit per ha, fixed factors
   * other than land per ha, land not a factor), in levels for 'pooled'.
   */
  fit: FitResult;
  landFactor: string | null;
  /** Parameter covariance split: the part from farm-level noise and the season-shock part. */
  parameterCovariance: { idiosyncratic: number[][]; season: number[][] };
  farmEffects: FarmEffects | null;
  seasonEffects: SeasonEffects | null;
  errorScale: ErrorScale | null;
  /** Seasons of the history, in order (labels and years). */
  seasons: { labels: string[]; years: number[] };
  outerIterations: number;
}
