/**
 * Fertiliser-budget shapes shared by the API (server/budget) and the screens: the three nutrients
 * and the product mix. Plain data, no Node imports.
 */

/**
 * The three nutrients a fertiliser budget sizes, named like the demo model's items: nitrogen in
 * kg N, phosphate in kg P2O5, potash in kg K2O (oxide basis, as grades are written).
 */
export const NUTRIENTS = ['nitrogen', 'phosphate', 'potash'] as const;
export type Nutrient = (typeof NUTRIENTS)[number];
export type NutrientAmounts = Record<Nutrient, number>;

/** How grades are written: N, P2O5, K2O (oxide basis). */
export const NUTRIENT_LABEL: Record<Nutrient, string> = { nitrogen: 'N', phosphate: 'P2O5', potash: 'K2O' };

/** Where a grade keeps each nutrient, % by weight: the fields of items, fertiliser products and booking lines. */
export const GRADE_FIELD = { nitrogen: 'nPct', phosphate: 'p2o5Pct', potash: 'k2oPct' } as const satisfies Record<Nutrient, string>;
export type GradeField = (typeof GRADE_FIELD)[Nutrient];

/** The grade's fields in N, P2O5, K2O order, with their labels: what a form shows, one field per nutrient. */
export const GRADE_FIELDS: readonly { nutrient: Nutrient; label: string; field: GradeField }[] = NUTRIENTS.map((nutrient) => ({
  nutrient,
  label: NUTRIENT_LABEL[nutrient],
  field: GRADE_FIELD[nutrient],
}));

export type LotRule = 'round-up' | 'whole-lots';

export interface MixLine {
  productId: number;
  name: string;
  grade: string;
  pricePerT: number;
  lotT: number;
  /** Tonnes in the least-cost continuous mix. */
  lpTonnes: number;
  lots: number;
  /** Tonnes bought: lots × lot size. */
  tonnes: number;
  cost: number;
  /** kg of N, P2O5, K2O the bought tonnes carry. */
  supplies: NutrientAmounts;
}

export interface MixResult {
  lotRule: LotRule;
  demand: NutrientAmounts;
  /** Only products bought (or chosen by the continuous mix), in the order given. */
  lines: MixLine[];
  /** Cost of the continuous least-cost mix. */
  lpCost: number;
  /** Cost of the tonnes bought in whole lots. */
  cost: number;
  /** Nutrients the bought tonnes carry, and what exceeds the need (lots, and N credited from MAP/DAP beyond the N need). */
  supply: NutrientAmounts;
  overSupply: NutrientAmounts;
  /** Nutrients the continuous mix carries beyond the need (a product carrying two nutrients can force it). */
  lpOverSupply: NutrientAmounts;
  warnings: string[];
}

export type SourceKind = 'model-run' | 'manual' | 'outlook' | 'contracted';
/** 'contracts': conditional (cost-side) elasticities on the contracting farms, the profit function's on the others. */
export type ElasticitySource = 'model-run' | 'given' | 'outlook' | 'contracts' | 'none';
export type ProductForm = 'solid' | 'liquid' | 'gas';

export interface BookingMonth {
  /** YYYY-MM */
  month: string;
  /** Share of each product's tonnage booked this month, 0 < share ≤ 1; the shares sum to 1. */
  share: number;
  /** Paid at booking with the discount (default), or on terms after delivery. */
  prepay: boolean;
}

export interface BookingPlan {
  months: BookingMonth[];
  prepayDiscountPct: number;
  paymentTermsDays: number;
  /** YYYY-MM when the product is taken and invoiced (tranches not prepaid). */
  deliveryMonth: string;
  /** Annual cost of the co-op's credit line, %, to weigh prepaying; null leaves it out. */
  financingRatePct: number | null;
}

export interface Tranche {
  bookingMonth: string;
  productId: number;
  name: string;
  tonnes: number;
  /** At the list price. */
  listValue: number;
  prepay: boolean;
  discount: number;
  paid: number;
  /** YYYY-MM-DD */
  payDate: string;
  payMonth: string;
  /** Interest on paying early, when a financing rate is given (prepaid tranches). */
  financingCost: number | null;
}

export interface CashMonth {
  month: string;
  bookedTonnes: number;
  /** Booked this month at list prices. */
  bookedValue: number;
  prepaid: number;
  onTerms: number;
  cash: number;
  cumulative: number;
}

export interface CashSchedule {
  months: CashMonth[];
  tranches: Tranche[];
  totals: {
    listValue: number;
    prepayDiscount: number;
    cash: number;
    financingCost: number | null;
    /** Discount minus financing cost of the prepaid tranches. */
    netPrepaySaving: number | null;
    peakMonth: string | null;
    peakCash: number;
  };
}

export type ElasticityMatrix = Record<Nutrient, Record<Nutrient, number>>;

export type PriceChanges = Partial<Record<Nutrient, number>>;

/** A fertiliser product as a budget copies it. */
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
  /** The list price per t, when the budget priced the product otherwise (from an outlook scenario). */
  listPricePerT?: number;
}

export interface ScenarioResult {
  name: string;
  priceChanges: PriceChanges;
  productPrices: { productId: number; name: string; changePct: number; pricePerT: number }[];
  demand: NutrientAmounts;
  demandElements: { p: number; k: number };
  /** % change from the base demand. */
  demandChangePct: NutrientAmounts;
  /** The model re-evaluated exactly at the changed prices (model-run sources). */
  modelDemand: NutrientAmounts | null;
  mix: MixResult;
  cash: CashSchedule;
  totals: {
    lpCost: number;
    /** Lots at list prices. */
    cost: number;
    /** Paid, after prepayment discounts. */
    cash: number;
    prepayDiscount: number;
    changeFromBasePct: number;
  };
}

export interface BudgetResult {
  softwareVersion: string;
  currency: string;
  units: { nutrient: string; product: string; price: string };
  lotRule: LotRule;
  source: { kind: SourceKind; detail: Record<string, unknown> };
  demand: {
    base: NutrientAmounts;
    elements: { p: number; k: number };
    elasticities: ElasticityMatrix | null;
    elasticitySource: ElasticitySource;
  };
  referencePrices: { values: Record<Nutrient, number | null>; basis: Record<Nutrient, 'given' | 'model-run' | 'products' | 'none'> };
  /**
   * How an outlook budget priced its products: from the chosen scenario's nutrient prices
   * ('outlook') or at list prices ('list'); the list's own price per kg of each nutrient against the
   * scenario's (gap = scenario − list); the outlook scenarios computed beside the base. Null for
   * other sources (and budgets stored before this existed).
   */
  pricing?: {
    basis: 'outlook' | 'list';
    scenario: string;
    gaps: { nutrient: Nutrient; list: number; target: number; gap: number }[];
    sideBySide: string[];
  } | null;
  products: (ProductCopy & { grade: string; costPerKg: Record<Nutrient, number | null> })[];
  scenarios: ScenarioResult[];
  cautions: string[];
  notes: string[];
  warnings: string[];
}
