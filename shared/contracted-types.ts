/**
 * Result shapes of the contracted-output evaluation (server/estimation/contracted.ts; method in
 * docs/cost-duality.md): with some outputs committed (forward delivery contracts), the marginal cost
 * of each committed output, the conditional (cost-minimising) demand of every input, the cost, and
 * the conditional price elasticities, per farm and for the co-op, with bands from the same
 * uncertainty as the projection. Plain data shared by the server and the screens.
 */
import type { ForecastQuantity, ProjectionHeader } from './forecast-types.js';

/**
 * A banded value: the point (at the estimates, no shocks) and the predictive summary over the draws.
 * Same shape as a projected quantity; unlike quantities, marginal costs and margins are not clipped
 * at zero (a margin can be negative).
 */
export type ContractedBand = ForecastQuantity;

/** One farm's commitments and circumstances, as the engine is given them. */
export interface ContractedFarmSpec {
  farm: string;
  /** Fixed factors in levels by name, land included (required for the per-hectare model). */
  fixed: Record<string, number>;
  /** Prices this farm faces (inputs, and outputs it has not contracted); items not named take the common prices. */
  prices?: Record<string, number>;
  /** Committed quantity per output in the item's unit (e.g. t); outputs not named stay free (partial contracting). */
  contracted: Record<string, number>;
  /** Agreed contract price per committed output (currency per unit), for the margin; optional. */
  contractPrices?: Record<string, number>;
  /**
   * The farm's own past quantities per hectare (per farm for the pooled model) by output, one entry
   * per past season; used only for words when a commitment lies beyond what the farm has grown.
   */
  history?: Record<string, number[]>;
}

/** Why a farm's commitment could not be evaluated, or what to be careful about. */
export type ContractedIssueKind =
  /** The committed quantity is more (or less) per hectare than the farm has recorded: evaluated, but an extrapolation. */
  | 'beyond-history'
  /** No positive output prices make the fitted technology supply the committed quantities. */
  | 'out-of-reach'
  /** The fitted supply does not respond to the output's price (singular Hessian block): no marginal cost is defined. */
  | 'singular'
  /** At the solution some input's conditional demand has the wrong sign. */
  | 'wrong-sign'
  /** The numerical solve did not settle. */
  | 'no-solution';

export interface ContractedIssue {
  /** The output (or input, for 'wrong-sign') concerned. */
  item: string;
  kind: ContractedIssueKind;
  /** One sentence in plain words. */
  text: string;
  /** True when the issue prevents the evaluation of this farm (no marginal costs for it). */
  blocking: boolean;
}

export interface ContractedOutputResult {
  /** Committed quantity (item unit) and per hectare (null for the pooled model). */
  quantity: number;
  perHectare: number | null;
  /** Marginal cost of the committed quantity (currency per unit) = the output price at which the farm would supply it. */
  marginalCost: ContractedBand | null;
  /** How the marginal cost rises with one more unit committed (currency per unit per unit), at the point. */
  marginalCostSlope: number | null;
  contractPrice: number | null;
  /** Contract price − marginal cost (currency per unit), when a contract price is given. */
  margin: ContractedBand | null;
  /** The farm's own record per hectare for this output, when given. */
  history: { min: number; max: number; seasons: number } | null;
}

/** Elasticities at the evaluated point: rows are inputs, columns the priced items (inputs and free outputs). */
export interface ElasticityTable {
  rows: string[];
  columns: string[];
  /** values[r][c] = ∂ln x_r / ∂ln p_c. */
  values: number[][];
}

export interface ContractedElasticities {
  /** Conditional (committed outputs held fixed): from the cost function, Shephard's lemma. */
  conditional: ElasticityTable;
  /** Unconditional (every output free) at the same prices (p*, w): from the profit function, Hotelling's lemma. */
  unconditional: ElasticityTable;
  /** ∂ln x_r / ∂ln y*_k: how each input's conditional demand scales with each committed output (columns = committed outputs). */
  output: ElasticityTable;
}

export interface ContractedFarmResult {
  farm: string;
  /** True when the farm has records in the history the model was fitted to (its own level is used). */
  known: boolean;
  land: number | null;
  /** False when a blocking issue prevents the evaluation (see issues); the bands are then absent. */
  evaluated: boolean;
  issues: ContractedIssue[];
  /** Per committed output. */
  outputs: Record<string, ContractedOutputResult>;
  /** Supply of the outputs not committed, at their own prices with the committed outputs fixed. */
  freeOutputs: Record<string, ContractedBand>;
  /** Conditional demand of every input (item unit, ≥ 0 when the technology is well behaved). */
  inputs: Record<string, ContractedBand>;
  /** Unconditional demand of every input at the stated prices (every output free): the outlook's point. */
  unconditionalInputs: Record<string, number>;
  /**
   * Cost C = Σ_committed p*·y* − π(p*, p_free, w): spending on the modelled variable inputs less the
   * revenue of the free outputs (with every output committed, the cost of the modelled inputs).
   */
  cost: ContractedBand | null;
  /** Spending on the modelled variable inputs, Σ w·x^c. */
  inputSpending: ContractedBand | null;
  elasticities: ContractedElasticities | null;
  /** Share of draws left out of the bands because the commitment could not be evaluated in them (singular; for the generalized Leontief also out of reach). */
  failedDrawShare: number;
  /**
   * Share of draws in which a committed output would need a price at or below zero (the farm would
   * grow more than committed even at a zero price). For the normalized quadratic these draws stay in
   * the bands (the marginal cost is then at or below zero); otherwise they are among the failed ones.
   */
  belowZeroDrawShare: number;
}

export interface ContractedCoopResult {
  /** Committed quantity summed over the farms evaluated, per output. */
  quantities: Record<string, number>;
  /** Quantity-weighted mean marginal cost over the evaluated farms that committed the output. */
  marginalCost: Record<string, ContractedBand>;
  /** Quantity-weighted mean margin over the evaluated farms that gave a contract price. */
  margin: Record<string, ContractedBand>;
  freeOutputs: Record<string, ContractedBand>;
  inputs: Record<string, ContractedBand>;
  unconditionalInputs: Record<string, number>;
  cost: ContractedBand;
  inputSpending: ContractedBand;
  /** Elasticities of the co-op totals (quantity-weighted over farms), at the point. */
  elasticities: ContractedElasticities | null;
  /** Farms included in the sums (evaluated) and left out (a blocking issue). */
  farmsEvaluated: number;
  farmsLeftOut: string[];
}

export interface ContractedEvaluation extends ProjectionHeader {
  /** Outputs committed by at least one farm. */
  committedOutputs: string[];
  farms: ContractedFarmResult[];
  coop: ContractedCoopResult;
  /** What the figures mean, in words (method notes for screens and exports). */
  notes: string[];
}
