import type { LotRule, MixResult, Nutrient, NutrientAmounts } from '../../../shared/budget-types';
import type { UnitSystem } from '../../../shared/units';

/**
 * The shapes the budget API answers with and accepts (server/budget/budget-compute.ts,
 * budget-schemas.ts, budget-service.ts, booking.ts). Declared here because those server modules
 * import Node-only code the client build cannot type-check; only the fields the screens read or
 * send are listed. The nutrients and the product mix are shared with the server (shared/budget-types.ts).
 */

export { NUTRIENT_LABEL, NUTRIENTS, type LotRule, type MixLine, type MixResult, type Nutrient, type NutrientAmounts } from '../../../shared/budget-types';

export type PriceChanges = Partial<Record<Nutrient, number>>;
export type ElasticityMatrix = Record<Nutrient, Record<Nutrient, number>>;
export type SourceKind = 'model-run' | 'manual' | 'outlook';
export type ProductForm = 'solid' | 'liquid' | 'gas';

/** `GET /api/fertiliser-products` rows. Prices per tonne of product, lots in tonnes (metric, as stored). */
export interface FertiliserProduct {
  id: number;
  name: string;
  nPct: number;
  p2o5Pct: number;
  k2oPct: number;
  form: ProductForm;
  pricePerT: number;
  currency: string;
  lotT: number;
  supplier: string;
  gradeSource: string;
  priceNote: string;
  active: boolean;
  updatedAt: string;
}

/** The body of POST/PUT `/api/fertiliser-products`. */
export type FertiliserProductInput = Omit<FertiliserProduct, 'id' | 'updatedAt'>;

// --- inputs -----------------------------------------------------------------------------------

export type BudgetSource =
  | {
      kind: 'model-run';
      runId: number;
      prices?: Record<string, number>;
      season?: number;
      items?: Partial<Record<Nutrient, string>>;
    }
  | { kind: 'manual'; nKg: number; p2o5Kg: number; k2oKg: number; elasticities?: ElasticityMatrix }
  | { kind: 'outlook'; outlookVersionId: number; scenario?: string; items?: Partial<Record<Nutrient, string>> };

export interface BookingMonthInput {
  /** YYYY-MM */
  month: string;
  /** 0 < share ≤ 1; the shares add up to 1. */
  share: number;
  prepay: boolean;
}

export interface BookingPlanInput {
  months: BookingMonthInput[];
  prepayDiscountPct: number;
  paymentTermsDays: number;
  deliveryMonth: string;
  financingRatePct: number | null;
}

export interface ScenarioInput {
  name: string;
  priceChanges: PriceChanges;
  productPriceChanges: Record<string, number>;
}

export interface BudgetOptions {
  lotRule: LotRule;
  referencePrices?: Partial<Record<Nutrient, number>>;
}

export interface BudgetProductChoice {
  productId: number;
  pricePerT?: number;
  lotT?: number;
}

/** The body of POST `/api/budgets`, `/api/budgets/preview` and PUT `/api/budgets/:id` (metric). */
export interface BudgetInput {
  name: string;
  source: BudgetSource;
  products?: BudgetProductChoice[];
  bookingPlan: BookingPlanInput;
  scenarios: ScenarioInput[];
  options: BudgetOptions;
}

// --- results ----------------------------------------------------------------------------------

/** A product as a budget copied it (metric: per t, t). */
export interface ProductCopy {
  productId: number;
  name: string;
  nPct: number;
  p2o5Pct: number;
  k2oPct: number;
  form: ProductForm;
  pricePerT: number;
  currency: string;
  lotT: number;
  supplier: string;
  gradeSource: string;
  priceNote: string;
}

export interface CashMonth {
  /** YYYY-MM */
  month: string;
  bookedTonnes: number;
  bookedValue: number;
  prepaid: number;
  onTerms: number;
  cash: number;
  cumulative: number;
}

export interface CashSchedule {
  months: CashMonth[];
  totals: {
    listValue: number;
    prepayDiscount: number;
    cash: number;
    financingCost: number | null;
    netPrepaySaving: number | null;
    peakMonth: string | null;
    peakCash: number;
  };
}

export interface ScenarioResult {
  name: string;
  priceChanges: PriceChanges;
  productPrices: { productId: number; name: string; changePct: number; pricePerT: number }[];
  demand: NutrientAmounts;
  demandElements: { p: number; k: number };
  demandChangePct: NutrientAmounts;
  modelDemand: NutrientAmounts | null;
  mix: MixResult;
  cash: CashSchedule;
  totals: { lpCost: number; cost: number; cash: number; prepayDiscount: number; changeFromBasePct: number };
}

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
}

/** A stored or previewed result, in the unit system asked for (`unitSystem`). */
export interface BudgetResult {
  softwareVersion: string;
  currency: string;
  unitSystem: UnitSystem;
  units: { nutrient: string; product: string; price: string };
  lotRule: LotRule;
  source: { kind: SourceKind; detail: SourceDetail };
  demand: {
    base: NutrientAmounts;
    elements: { p: number; k: number };
    elasticities: ElasticityMatrix | null;
    elasticitySource: 'model-run' | 'given' | 'outlook' | 'none';
  };
  referencePrices: {
    values: Record<Nutrient, number | null>;
    basis: Record<Nutrient, 'given' | 'model-run' | 'products' | 'none'>;
  };
  products: (ProductCopy & { grade: string; costPerKg: Record<Nutrient, number | null> })[];
  scenarios: ScenarioResult[];
  cautions: string[];
  notes: string[];
  warnings: string[];
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
