/**
 * The budget API's request bodies (zod), one declaration for the server, which parses with them,
 * and the client, whose form types and field checks derive from them.
 */
import { z } from 'zod';
import { idSchema } from './ids.js';
import { currencySchema, MONTH_PATTERN, SEASON_YEARS, TEXT_MAX } from './field-limits.js';

/** A % price change: above −100 % (a price cannot fall to zero) and at most +500 %. */
export const pctChangeSchema = z.number().gt(-100, 'A price change must be above −100 %').max(500, 'A price change above +500 % is not plausible');
const itemCode = z.string().trim().min(1).max(TEXT_MAX.code);
const month = z.string().regex(MONTH_PATTERN, 'Use YYYY-MM, e.g. 2026-08');
const kg = z.number().nonnegative('Use a number of kg ≥ 0').max(1e12);

const nutrientRecord = <T extends z.ZodType>(v: T) => z.strictObject({ nitrogen: v, phosphate: v, potash: v });

/** ∂ln x_i/∂ln p_j for i, j ∈ nitrogen, phosphate, potash. */
export const elasticityMatrixSchema = nutrientRecord(nutrientRecord(z.number().min(-20).max(20)));

/**
 * Where the nutrient demand comes from.
 * - model-run: a succeeded run, evaluated per farm at expected prices (items not given: last season's mean).
 * - manual: kg N, P2O5, K2O given, optionally with elasticities for the scenarios.
 * - outlook: a published outlook version's co-op projection in one of its price scenarios (issue 6).
 * - contracted: an outlook's contracted evaluation (issue 19): farms with signed contracts at their
 *   committed output (conditional demand), every other farm as the outlook projects it.
 */
export const budgetSourceSchema = z.discriminatedUnion('kind', [
  z.strictObject({
    kind: z.literal('model-run'),
    runId: idSchema,
    prices: z.record(itemCode, z.number().positive('An expected price must be above 0')).default({}),
    /** Season (first calendar year) projected; default the run's last season + 1. */
    season: z.number().int().min(SEASON_YEARS.min).max(SEASON_YEARS.max).optional(),
    /** Model item of each nutrient; default the fertiliser item carrying only that nutrient at 100 %. */
    items: z.strictObject({ nitrogen: itemCode, phosphate: itemCode, potash: itemCode }).partial().optional(),
  }),
  z.strictObject({
    kind: z.literal('manual'),
    nKg: kg,
    p2o5Kg: kg,
    k2oKg: kg,
    elasticities: elasticityMatrixSchema.optional(),
  }),
  z.strictObject({
    kind: z.literal('outlook'),
    outlookVersionId: idSchema,
    /** The outlook's price scenario to start from (low, base, high). */
    scenario: z.string().trim().min(1).max(40).default('base'),
    /** 'outlook': the products cost the scenario's nutrient prices; 'list': list prices, the gap warned of. */
    pricing: z.enum(['outlook', 'list']).default('outlook'),
    /** Compute the outlook's other scenarios (low, high) beside the chosen one. */
    sideBySide: z.boolean().default(true),
    items: z.strictObject({ nitrogen: itemCode, phosphate: itemCode, potash: itemCode }).partial().optional(),
  }),
  z.strictObject({
    kind: z.literal('contracted'),
    /** The outlook whose contracted evaluation gives the demand. */
    outlookId: idSchema,
    /** The evaluation (job) to use; default the outlook's latest finished one. */
    evaluationId: idSchema.optional(),
    items: z.strictObject({ nitrogen: itemCode, phosphate: itemCode, potash: itemCode }).partial().optional(),
  }),
]);
export type BudgetSource = z.output<typeof budgetSourceSchema>;

/** The share of the season's tonnage booked in one month, as a fraction (0.4 = 40 %). */
export const bookedShareSchema = z.number().gt(0, 'A booked share must be above 0').max(1, 'A booked share is at most 1 (100 %)');

export const bookingPlanSchema = z.strictObject({
  months: z
    .array(z.strictObject({ month, share: bookedShareSchema, prepay: z.boolean().default(true) }))
    .min(1, 'Book at least one month')
    .max(24, 'Book over at most 24 months'),
  prepayDiscountPct: z.number().min(0).max(50).default(0),
  paymentTermsDays: z.number().int().min(0).max(365).default(30),
  deliveryMonth: month,
  financingRatePct: z.number().min(0).max(100).nullable().default(null),
});

export const scenarioSchema = z.strictObject({
  name: z.string().trim().min(1, 'Name the scenario').max(80),
  /** % change of each nutrient's price, e.g. { nitrogen: 20 }. */
  priceChanges: z.strictObject({ nitrogen: pctChangeSchema, phosphate: pctChangeSchema, potash: pctChangeSchema }).partial().default({}),
  /** % change of single products' prices by product id, overriding the nutrient rule. */
  productPriceChanges: z.record(z.string().regex(/^\d+$/, 'Key by product id'), pctChangeSchema).default({}),
});

export const budgetOptionsSchema = z.strictObject({
  lotRule: z.enum(['round-up', 'whole-lots']).default('round-up'),
  /** Per kg of N, P2O5, K2O, for splitting a nutrient price change over multi-nutrient products. */
  referencePrices: z.strictObject({ nitrogen: z.number().positive(), phosphate: z.number().positive(), potash: z.number().positive() }).partial().optional(),
});

export const budgetProductChoiceSchema = z.strictObject({
  productId: idSchema,
  /** This budget's price per t (a quote), instead of the product list's. */
  pricePerT: z.number().positive().max(1e6).optional(),
  lotT: z.number().positive().max(1e5).optional(),
});

export const budgetInputSchema = z
  .strictObject({
    name: z.string().trim().min(1, 'Name the budget').max(TEXT_MAX.name),
    source: budgetSourceSchema,
    /** Products to plan with; default every active product. */
    products: z.array(budgetProductChoiceSchema).min(1, 'Choose at least one product').max(50).optional(),
    bookingPlan: bookingPlanSchema,
    scenarios: z.array(scenarioSchema).max(12, 'At most 12 scenarios').default([]),
    options: budgetOptionsSchema.default({ lotRule: 'round-up' }),
  })
  .superRefine((b, ctx) => {
    const seen = new Set<string>(['base']);
    b.scenarios.forEach((s, i) => {
      const key = s.name.toLowerCase();
      if (seen.has(key)) ctx.addIssue({ code: 'custom', message: key === 'base' ? '"Base" is the name of the unchanged scenario' : 'Two scenarios have this name', path: ['scenarios', i, 'name'] });
      seen.add(key);
    });
    const ids = new Set<number>();
    b.products?.forEach((p, i) => {
      if (ids.has(p.productId)) ctx.addIssue({ code: 'custom', message: 'This product is chosen twice', path: ['products', i, 'productId'] });
      ids.add(p.productId);
    });
  });
export type BudgetInput = z.output<typeof budgetInputSchema>;
export type BookingPlanInput = z.output<typeof bookingPlanSchema>;
export type ScenarioInput = z.output<typeof scenarioSchema>;
export type BudgetOptions = z.output<typeof budgetOptionsSchema>;

export const fertiliserProductSchema = z
  .strictObject({
    name: z.string().trim().min(1, 'Name the product').max(TEXT_MAX.name),
    nPct: z.number().min(0).max(100).default(0),
    p2o5Pct: z.number().min(0).max(100).default(0),
    k2oPct: z.number().min(0).max(100).default(0),
    form: z.enum(['solid', 'liquid', 'gas']),
    pricePerT: z.number().positive('The price per tonne must be above 0').max(1e6),
    currency: currencySchema,
    lotT: z.number().positive('The lot size must be above 0 t').max(1e5),
    supplier: z.string().trim().max(TEXT_MAX.name).default(''),
    gradeSource: z.string().trim().max(TEXT_MAX.productNote).default(''),
    priceNote: z.string().trim().max(TEXT_MAX.productNote).default(''),
    active: z.boolean().default(true),
  })
  .superRefine((p, ctx) => {
    const sum = p.nPct + p.p2o5Pct + p.k2oPct;
    if (sum <= 0) ctx.addIssue({ code: 'custom', message: 'A fertiliser product carries at least one of N, P2O5, K2O', path: ['nPct'] });
    if (sum > 100) ctx.addIssue({ code: 'custom', message: `N + P2O5 + K2O add up to ${sum} %, more than 100 %`, path: ['nPct'] });
  });
export type FertiliserProductInput = z.output<typeof fertiliserProductSchema>;

export const budgetViewQuerySchema = z.object({
  units: z.enum(['metric', 'us'], { error: 'Choose units=metric or units=us' }).optional(),
});

export const budgetExportQuerySchema = z.object({
  format: z.enum(['csv', 'xlsx'], { error: 'Choose format=csv or format=xlsx' }).default('xlsx'),
  units: z.enum(['metric', 'us'], { error: 'Choose units=metric or units=us' }).optional(),
});
