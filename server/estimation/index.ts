/**
 * Netput estimation engine: fit a profit function to price and quantity histories and project
 * supply and input demand by Hotelling's lemma. Pure and synchronous, no I/O; every input and
 * result is plain JSON, so the functions can run in a worker thread.
 *
 * Typical use:
 *   const dataset = parseNetputCsv(csvText);                  // EstimationInputError on bad cells
 *   const fit = fitProfitFunction(dataset, { trend: true });  // NQ, iterated SUR, symmetry imposed
 *   const doc = fitToContractJson(fit, { prices: { wheat: 260 } });
 *   const outlook = projectSeason(fit, { scenarios, farms, draws: 10000, seed: 1 });
 *
 * Forecasting (per-hectare model with farm and season effects, predictive bands, back-test):
 *   const model = fitForecastModel(dataset, { trend: true });     // per hectare when land is recorded
 *   const proj = projectForecast(model, { farms, prices, draws: 10000, seed: 1 });
 *   const bt = backTestForecast(dataset, { trend: true }); describeBackTest(bt);
 *
 * Bad input throws EstimationInputError {message, row?, column?}: map it to HTTP 422.
 */
export { EstimationInputError, isEstimationInputError, type EstimationInputErrorDetails } from './errors.js';
export { parseNetputCsv, type ItemRole, type NetputDataset, type NetputItem } from './dataset.js';
export {
  fitProfitFunction,
  type CoefficientEstimate,
  type CurvatureReport,
  type EquationFit,
  type FitOptions,
  type FitResult,
  type MonotonicityReport,
} from './fit.js';
export type { FormName, ModelLayout } from './model.js';
export {
  deltaMethod,
  elasticitiesAt,
  evaluateFit,
  longRunResponse,
  priceHessianAt,
  resolvePoint,
  shadowValues,
  type ElasticityResult,
  type Evaluation,
  type EvaluationPoint,
  type LongRunOptions,
  type LongRunResult,
  type ResolvedPoint,
  type ShadowValue,
} from './results.js';
export {
  PROJECTION_CAUTION,
  projectSeason,
  type FarmProjection,
  type ProjectionFarm,
  type ProjectionOptions,
  type ProjectionResult,
  type ProjectionScenario,
  type QuantitySummary,
  type ScenarioProjection,
} from './projection.js';
export { FIT_CAUTION, fitToContractJson, type FitContractJson } from './contract.js';
export { fitSur, type SurEquationInput, type SurOptions, type SurResult } from './sur.js';
export { ols, type OlsResult } from './ols.js';
export { datasetToCsv, DEMO_ITEMS, generateNqPanel, type SyntheticItem, type SyntheticPanel, type SyntheticSpec } from './synthetic.js';
export {
  fitForecastModel,
  landFactorIndex,
  type ErrorScale,
  type FarmEffects,
  type ForecastModel,
  type ForecastModelOptions,
  type ForecastSpec,
  type SeasonEffects,
} from './panel.js';
export { projectForecast, type FarmForecast, type ForecastFarm, type ForecastOptions, type ForecastProjection, type ForecastQuantity } from './forecast.js';
export { generateForecastPanel, PER_HECTARE_ITEMS, type ForecastPanel, type ForecastPanelSpec } from './synthetic-panel.js';
export { backTestForecast, describeBackTest, subset, type BackTestItem, type BackTestOptions, type BackTestOrigin, type BackTestResult, type CoverageCount, type ErrorSummary } from './backtest.js';
export { CONTRACTED_CAUTION, evaluateContracted, type ContractedOptions } from './contracted.js';
export type {
  ContractedBand,
  ContractedCoopResult,
  ContractedElasticities,
  ContractedEvaluation,
  ContractedFarmResult,
  ContractedFarmSpec,
  ContractedIssue,
  ContractedIssueKind,
  ContractedOutputResult,
  ElasticityTable,
} from '../../shared/contracted-types.js';
export { dualAt, solveCommitted, type DualPoint, type SolveResult, type Technology } from './contracted-core.js';
