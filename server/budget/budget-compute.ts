/**
 * A budget's result from its inputs: for the base case and each price scenario, the nutrient
 * demand, the least-cost product mix in delivery lots and the booking and cash schedule. Pure and
 * deterministic: the same inputs (and software version) give the same result.
 */
import type { BudgetResult, ProductCopy, ScenarioResult, SourceKind, ElasticitySource } from '../../shared/budget-types.js';
import { VERSION } from '../version.js';
import { cashSchedule, checkBookingPlan, type BookingPlan, type CashSchedule } from './booking.js';
import { BUDGET_CAUTIONS, BUDGET_METHOD_NOTES } from './cautions.js';
import { BudgetInputError, elementsOf, gradeLabel, kgPerTonne, NUTRIENTS, type Nutrient, type NutrientAmounts } from './nutrients.js';
import { solveProductMix, type LotRule, type MixProduct, type MixResult } from './product-mix.js';
import { productPriceChangePct, referencePricesFromProducts, respondDemand, type ElasticityMatrix, type PriceChanges } from './scenarios.js';

export type { BudgetResult, ProductCopy, ScenarioResult } from '../../shared/budget-types.js';

/** The nutrient demand a source resolved to, with what the scenarios need from it. */
export interface ResolvedSource {
  kind: SourceKind;
  demand: NutrientAmounts;
  elasticities: ElasticityMatrix | null;
  elasticitySource: ElasticitySource;
  /** Per kg of nutrient at the source's price point (a model run's nutrient item prices). */
  nutrientPrices: Partial<Record<Nutrient, number>>;
  /** What the source says about itself (run, prices, farms...), shown and exported as is. */
  detail: Record<string, unknown>;
  warnings: string[];
  /** Exact demand at changed nutrient prices, when the source is a model that can be re-evaluated. */
  exactDemandAt?: (changes: PriceChanges) => NutrientAmounts;
}

export interface ScenarioSpec {
  name: string;
  priceChanges: PriceChanges;
  productPriceChanges: Record<string, number>;
}

export interface BudgetComputeInput {
  currency: string;
  products: ProductCopy[];
  bookingPlan: BookingPlan;
  scenarios: ScenarioSpec[];
  lotRule: LotRule;
  referencePrices?: Partial<Record<Nutrient, number>>;
}

function referencePrices(input: BudgetComputeInput, source: ResolvedSource): BudgetResult['referencePrices'] {
  const fromProducts = referencePricesFromProducts(input.products);
  const values = {} as Record<Nutrient, number | null>;
  const basis = {} as BudgetResult['referencePrices']['basis'];
  for (const n of NUTRIENTS) {
    if (input.referencePrices?.[n] !== undefined) [values[n], basis[n]] = [input.referencePrices[n]!, 'given'];
    else if (source.nutrientPrices[n] !== undefined) [values[n], basis[n]] = [source.nutrientPrices[n]!, 'model-run'];
    else if (fromProducts[n] !== null) [values[n], basis[n]] = [fromProducts[n], 'products'];
    else [values[n], basis[n]] = [null, 'none'];
  }
  return { values, basis };
}

const pctChange = (a: number, b: number) => (b === 0 ? 0 : (100 * (a - b)) / b);

export function computeBudget(input: BudgetComputeInput, source: ResolvedSource): BudgetResult {
  if (!input.products.length) throw new BudgetInputError('Choose at least one product', 'products');
  input.products.forEach((p, i) => {
    if (p.currency !== input.currency) throw new BudgetInputError(`${p.name} is priced in ${p.currency}, but the co-op's budgets are in ${input.currency}`, `products.${i}`);
  });
  for (const s of input.scenarios)
    for (const id of Object.keys(s.productPriceChanges))
      if (!input.products.some((p) => String(p.productId) === id)) throw new BudgetInputError(`Scenario "${s.name}": product ${id} is not in this budget`, `scenarios.productPriceChanges.${id}`);
  checkBookingPlan(input.bookingPlan);
  const refs = referencePrices(input, source);
  const warnings = [...source.warnings];
  if (!source.elasticities && input.scenarios.some((s) => NUTRIENTS.some((n) => (s.priceChanges[n] ?? 0) !== 0)))
    warnings.push('The demand source has no elasticities, so the scenarios change prices but hold the nutrient demand fixed');

  const specs: ScenarioSpec[] = [{ name: 'Base', priceChanges: {}, productPriceChanges: {} }, ...input.scenarios];
  const scenarios: ScenarioResult[] = [];
  for (const spec of specs) {
    const productPrices = input.products.map((p) => {
      const changePct = productPriceChangePct(p, refs.values, spec.priceChanges, spec.productPriceChanges[String(p.productId)]);
      return { productId: p.productId, name: p.name, changePct, pricePerT: p.pricePerT * (1 + changePct / 100) };
    });
    const mixProducts: MixProduct[] = input.products.map((p, i) => ({ ...p, pricePerT: productPrices[i]!.pricePerT }));
    const demand = respondDemand(source.demand, source.elasticities, spec.priceChanges);
    const mix = solveProductMix(demand, mixProducts, input.lotRule);
    const cash = cashSchedule(
      mix.lines.map((l) => ({ productId: l.productId, name: l.name, tonnes: l.tonnes, pricePerT: l.pricePerT })),
      input.bookingPlan,
    );
    const changed = NUTRIENTS.some((n) => (spec.priceChanges[n] ?? 0) !== 0);
    scenarios.push({
      name: spec.name,
      priceChanges: spec.priceChanges,
      productPrices,
      demand,
      demandElements: elementsOf(demand),
      demandChangePct: { nitrogen: pctChange(demand.nitrogen, source.demand.nitrogen), phosphate: pctChange(demand.phosphate, source.demand.phosphate), potash: pctChange(demand.potash, source.demand.potash) },
      modelDemand: source.exactDemandAt ? (changed ? source.exactDemandAt(spec.priceChanges) : { ...source.demand }) : null,
      mix,
      cash,
      totals: { lpCost: mix.lpCost, cost: mix.cost, cash: cash.totals.cash, prepayDiscount: cash.totals.prepayDiscount, changeFromBasePct: 0 },
    });
  }
  const base = scenarios[0]!.totals.cash;
  for (const s of scenarios) s.totals.changeFromBasePct = pctChange(s.totals.cash, base);
  for (const s of scenarios) for (const w of s.mix.warnings) warnings.push(`${s.name}: ${w}`);

  return {
    softwareVersion: VERSION,
    currency: input.currency,
    units: { nutrient: 'kg', product: 't', price: `${input.currency} per t` },
    lotRule: input.lotRule,
    source: { kind: source.kind, detail: source.detail },
    demand: { base: { ...source.demand }, elements: elementsOf(source.demand), elasticities: source.elasticities, elasticitySource: source.elasticitySource },
    referencePrices: refs,
    products: input.products.map((p) => ({
      ...p,
      grade: gradeLabel(p),
      // Price per kg of nutrient, for single-nutrient products only (a MAP/DAP price buys two nutrients).
      costPerKg: Object.fromEntries(
        NUTRIENTS.map((n) => [n, kgPerTonne(p, n) > 0 && NUTRIENTS.every((m) => m === n || kgPerTonne(p, m) === 0) ? p.pricePerT / kgPerTonne(p, n) : null]),
      ) as Record<Nutrient, number | null>,
    })),
    scenarios,
    cautions: [...BUDGET_CAUTIONS],
    notes: [...BUDGET_METHOD_NOTES],
    warnings,
  };
}
