/**
 * A budget's result from its inputs: for the base case and each price scenario, the nutrient
 * demand, the least-cost product mix in delivery lots and the booking and cash schedule. Pure and
 * deterministic: the same inputs (and software version) give the same result.
 */
import type { BudgetResult, ProductCopy, ScenarioResult, SourceKind, ElasticitySource } from '../../shared/budget-types.js';
import { VERSION } from '../version.js';
import { cashSchedule, checkBookingPlan, type BookingPlan, type CashSchedule } from './booking.js';
import { BUDGET_CAUTIONS, BUDGET_METHOD_NOTES } from './budget-cautions.js';
import { BudgetInputError, elementsOf, gradeLabel, kgPerTonne, NUTRIENTS, type Nutrient, type NutrientAmounts } from './nutrients.js';
import { solveProductMix, type LotRule, type MixProduct, type MixResult } from './product-mix.js';
import { alignToNutrientPrices, productPriceChangePct, referencePricesFromProducts, respondDemand, type ElasticityMatrix, type PriceChanges, type PriceGap } from './scenarios.js';

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
  /**
   * An outlook's price scenarios (outlook sources): each one's published demand and nutrient prices
   * per kg. The chosen one is the budget's base; with sideBySide the others are computed beside it.
   */
  outlookScenarios?: { name: string; demand: NutrientAmounts; nutrientPrices: Partial<Record<Nutrient, number>> }[];
  /** 'source': products are priced from the source's nutrient prices; 'list' (default): as listed. */
  pricing?: 'source' | 'list';
  sideBySide?: boolean;
}

export interface ScenarioSpec {
  name: string;
  priceChanges: PriceChanges;
  productPriceChanges: Record<string, number>;
}

/** An outlook scenario computed beside the base: its own demand and its own product prices. */
interface FixedSpec {
  name: string;
  /** % change of the nutrient prices from the base row's. */
  priceChanges: PriceChanges;
  demand: NutrientAmounts;
  products: { productId: number; changePct: number; pricePerT: number }[];
}

const money = (v: number) => v.toFixed(2);
const NUTRIENT_UNIT: Record<Nutrient, string> = { nitrogen: 'kg N', phosphate: 'kg P2O5', potash: 'kg K2O' };

/** "nitrogen 1.03 EUR/kg N on the list, 1.56 in the outlook's low scenario (+0.53)". */
function gapWords(g: PriceGap, currency: string, scenario: string): string {
  const sign = g.gap >= 0 ? '+' : '−';
  return `${NUTRIENT_UNIT[g.nutrient].slice(3)} ${money(g.list)} ${currency}/${NUTRIENT_UNIT[g.nutrient]} on the product list, ${money(g.target)} in the outlook's ${scenario} scenario (gap ${sign}${money(Math.abs(g.gap))} ${currency}/${NUTRIENT_UNIT[g.nutrient]})`;
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

/**
 * Product prices for a source with nutrient prices of its own (an outlook scenario): with pricing
 * 'source' the products are repriced to the chosen scenario's nutrient prices, each other outlook
 * scenario gets its own prices and published demand; with 'list' they stay as listed (a warning
 * names the gap per kg of nutrient) and the other scenarios move them by the outlook's own % change.
 */
function priceFromSource(input: BudgetComputeInput, source: ResolvedSource, warnings: string[]): { products: ProductCopy[]; fixed: FixedSpec[]; summary: BudgetResult['pricing'] } {
  const scen = source.outlookScenarios;
  const chosen = String(source.detail['scenario'] ?? 'base');
  if (!scen?.length || source.kind !== 'outlook') return { products: input.products, fixed: [], summary: null };
  const fromSource = source.pricing === 'source';
  // Budget quotes stay as quoted; only list prices follow the outlook.
  const followable = input.products.filter((p) => p.priceNote !== 'Budget quote');
  const quoted = input.products.filter((p) => p.priceNote === 'Budget quote');
  const aligned = alignToNutrientPrices(followable, source.nutrientPrices);
  if (!fromSource)
    for (const g of aligned.gaps)
      if (Math.abs(g.gap) >= 0.005) warnings.push(`The product list disagrees with the outlook: ${gapWords(g, input.currency, chosen)}. This budget buys at the list prices`);
  const products = fromSource
    ? input.products.map((p) => {
        const a = aligned.products.find((x) => x.productId === p.productId);
        return a ? { ...p, pricePerT: a.pricePerT, listPricePerT: p.pricePerT, priceNote: `Priced from the outlook's ${chosen} scenario (${a.changePct >= 0 ? '+' : '−'}${Math.abs(a.changePct).toFixed(1)} % on the list)` } : p;
      })
    : input.products;
  const fixed: FixedSpec[] = [];
  const basePrices = source.nutrientPrices;
  if (source.sideBySide)
    for (const o of scen) {
      if (o.name === chosen) continue;
      const priceChanges: PriceChanges = {};
      for (const n of NUTRIENTS) if (basePrices[n] && o.nutrientPrices[n]) priceChanges[n] = 100 * (o.nutrientPrices[n]! / basePrices[n]! - 1);
      // From the list: to the scenario's prices ('source'), or by its % change from the chosen scenario ('list').
      const target: Partial<Record<Nutrient, number>> = {};
      for (const g of aligned.gaps) target[g.nutrient] = fromSource ? (o.nutrientPrices[g.nutrient] ?? g.target) : g.list * (1 + (priceChanges[g.nutrient] ?? 0) / 100);
      const moved = alignToNutrientPrices(followable, target);
      fixed.push({
        name: `Outlook ${o.name}`,
        priceChanges,
        demand: o.demand,
        products: [
          ...moved.products.map((p) => {
            const base = products.find((x) => x.productId === p.productId)!;
            return { productId: p.productId, pricePerT: p.pricePerT, changePct: pctChange(p.pricePerT, base.pricePerT) };
          }),
          ...quoted.map((p) => ({ productId: p.productId, pricePerT: p.pricePerT, changePct: 0 })),
        ],
      });
    }
  for (const s of input.scenarios)
    if (fixed.some((f) => f.name.toLowerCase() === s.name.toLowerCase()))
      throw new BudgetInputError(`"${s.name}" is the name of the outlook's scenario shown beside the base; name yours otherwise`, `scenarios.${input.scenarios.indexOf(s)}.name`);
  return {
    products,
    fixed,
    summary: { basis: fromSource ? 'outlook' : 'list', scenario: chosen, gaps: aligned.gaps, sideBySide: fixed.map((f) => f.name) },
  };
}

export function computeBudget(input: BudgetComputeInput, source: ResolvedSource): BudgetResult {
  if (!input.products.length) throw new BudgetInputError('Choose at least one product', 'products');
  input.products.forEach((p, i) => {
    if (p.currency !== input.currency) throw new BudgetInputError(`${p.name} is priced in ${p.currency}, but the co-op's budgets are in ${input.currency}`, `products.${i}`);
  });
  for (const s of input.scenarios)
    for (const id of Object.keys(s.productPriceChanges))
      if (!input.products.some((p) => String(p.productId) === id)) throw new BudgetInputError(`Scenario "${s.name}": product ${id} is not in this budget`, `scenarios.productPriceChanges.${id}`);
  checkBookingPlan(input.bookingPlan);
  const warnings = [...source.warnings];
  // An outlook budget buys at its scenario's nutrient prices, or at list prices with the gap named.
  const pricing = priceFromSource(input, source, warnings);
  input = { ...input, products: pricing.products };
  const refs = referencePrices(input, source);
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
  for (const f of pricing.fixed) {
    const productPrices = input.products.map((p) => {
      const q = f.products.find((x) => x.productId === p.productId)!;
      return { productId: p.productId, name: p.name, changePct: q.changePct, pricePerT: q.pricePerT };
    });
    const mix = solveProductMix(f.demand, input.products.map((p, i) => ({ ...p, pricePerT: productPrices[i]!.pricePerT })), input.lotRule);
    const cash = cashSchedule(mix.lines.map((l) => ({ productId: l.productId, name: l.name, tonnes: l.tonnes, pricePerT: l.pricePerT })), input.bookingPlan);
    // Beside the base, before the treasurer's own scenarios.
    scenarios.splice(1 + pricing.fixed.indexOf(f), 0, {
      name: f.name,
      priceChanges: f.priceChanges,
      productPrices,
      demand: f.demand,
      demandElements: elementsOf(f.demand),
      demandChangePct: { nitrogen: pctChange(f.demand.nitrogen, source.demand.nitrogen), phosphate: pctChange(f.demand.phosphate, source.demand.phosphate), potash: pctChange(f.demand.potash, source.demand.potash) },
      modelDemand: null,
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
    pricing: pricing.summary,
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
