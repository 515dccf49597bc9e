import type { BudgetResult as EngineBudgetResult, ElasticityMatrix, LotRule, Nutrient, NutrientAmounts, PriceChanges, ProductCopy, SourceKind } from '../../../shared/budget-types';
import type { UnitSystem } from '../../../shared/units';
import type { z } from 'zod';
import type { bookingPlanSchema, budgetInputSchema, budgetOptionsSchema, budgetProductChoiceSchema, budgetSourceSchema, scenarioSchema } from '../../../shared/budget-schemas';

/**
 * The shapes the budget API answers with and accepts. The engine's result (nutrients, product mix,
 * booking and cash, scenarios) is declared once in shared/budget-types.ts; the request bodies are
 * the types of the zod schemas in shared/budget-schemas.ts, which the server parses with; the list
 * rows follow server/budget/budget-service.ts, with the fields the screens read.
 */

export {
  GRADE_FIELD,
  GRADE_FIELDS,
  NUTRIENT_LABEL,
  NUTRIENTS,
  type CashMonth,
  type CashSchedule,
  type ElasticityMatrix,
  type LotRule,
  type MixLine,
  type MixResult,
  type Nutrient,
  type NutrientAmounts,
  type PriceChanges,
  type ProductCopy,
  type ProductForm,
  type ScenarioResult,
  type SourceKind,
  type Tranche,
} from '../../../shared/budget-types';

/** `GET /api/fertiliser-products` rows. Prices per tonne of product, lots in tonnes (metric, as stored). */
export interface FertiliserProduct extends Omit<ProductCopy, 'productId'> {
  id: number;
  active: boolean;
  updatedAt: string;
}

/** The body of POST/PUT `/api/fertiliser-products`. */
export type FertiliserProductInput = Omit<FertiliserProduct, 'id' | 'updatedAt'>;

// --- inputs -----------------------------------------------------------------------------------

/** Where the demand comes from, as sent (fields with a server default may be left out). */
export type BudgetSource = z.input<typeof budgetSourceSchema>;
export type BookingMonthInput = BookingPlanInput['months'][number];
export type BookingPlanInput = z.output<typeof bookingPlanSchema>;
export type ScenarioInput = z.output<typeof scenarioSchema>;
export type BudgetOptions = z.output<typeof budgetOptionsSchema>;
export type BudgetProductChoice = z.output<typeof budgetProductChoiceSchema>;

/** The body of POST `/api/budgets`, `/api/budgets/preview` and PUT `/api/budgets/:id` (metric). */
export type BudgetInput = Omit<z.output<typeof budgetInputSchema>, 'source'> & { source: BudgetSource };

// --- results ----------------------------------------------------------------------------------

/** What a source says about itself (`result.source.detail`); which fields appear depends on the kind. */
export interface SourceDetail {
  runId?: number;
  modelId?: number;
  modelName?: string | null;
  dataHash?: string;
  runSoftwareVersion?: string;
  season?: number | null;
  seasonLabel?: string | null;
  prices?: Record<string, number>;
  priceBasis?: Record<string, 'given' | 'last season'>;
  /** Name and unit of each priced item (`wheat` → Wheat, t); absent in results saved before they came with them. */
  priceItems?: Record<string, { name: string; unit: string }>;
  nutrientItems?: Record<Nutrient, { code: string; kgPerUnit: number }>;
  farms?: unknown[];
  // outlook
  outlookId?: number;
  versionId?: number;
  version?: number;
  title?: string;
  publishedAt?: string;
  scenario?: string;
  bands?: Record<Nutrient, { p5: number; p95: number }>;
  // contracted output
  evaluationId?: number;
  computedAt?: string;
  contracts?: number;
  contractingFarms?: number;
  farmsLeftOut?: string[];
  /** The same outlook's base projection (every farm's output free), for comparison. */
  outlookDemand?: Record<Nutrient, number>;
  note?: string;
}

/** A stored or previewed result, in the unit system asked for (`unitSystem`). */
export interface BudgetResult extends Omit<EngineBudgetResult, 'source'> {
  unitSystem: UnitSystem;
  source: { kind: SourceKind; detail: SourceDetail };
}

/** The stored inputs, as `GET /api/budgets/:id` and the preview return them beside the result. */
export interface StoredInputs {
  source: BudgetSource;
  products: ProductCopy[];
  bookingPlan: BookingPlanInput;
  scenarios: ScenarioInput[];
  options: BudgetOptions;
}

/** `POST /api/budgets/preview`. */
export interface BudgetPreview extends StoredInputs {
  name: string;
  result: BudgetResult;
}

/** `GET /api/budgets/:id`, `POST /api/budgets`, `PUT /api/budgets/:id`. */
export interface BudgetView extends StoredInputs {
  id: number;
  name: string;
  result: BudgetResult;
  softwareVersion: string;
  createdBy: number | null;
  updatedBy: number | null;
  createdByName: string | null;
  updatedByName: string | null;
  createdAt: string;
  updatedAt: string;
}

/** `GET /api/budgets` rows (demand in kg, money in the budget's currency). */
export interface BudgetListRow {
  id: number;
  name: string;
  sourceKind: SourceKind;
  currency: string;
  baseCash: number;
  baseDemand: NutrientAmounts;
  scenarioNames: string[];
  createdAt: string;
  updatedAt: string;
}

// --- where demand can come from -----------------------------------------------------------------

/** `GET /api/outlooks/versions` rows: published, frozen outlooks. */
export interface OutlookVersionRow {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  title: string;
  modelRunId: number;
  publishedAt: string;
  publishedBy: string | null;
}

/** The part of `GET /api/outlooks/versions/:id` the budget reads: its price scenarios. */
export interface OutlookVersionScenarios {
  id: number;
  scenarios: { name: string }[];
}

/** The part of `GET /api/models` rows the budget reads. */
export interface ModelWithRuns {
  id: number;
  name: string;
  runs: { id: number; status: string; finishedAt: string | null; createdAt: string }[];
}
