/**
 * A budget result in the reader's unit system. Results are computed and stored in metric (kg of
 * nutrient, t of product, money per t); US units show lb, short tons and money per short ton,
 * converted with the exact factors of shared/units.ts. Elasticities and money totals do not change.
 */
import { inUnitSystem, type UnitSystem } from '../../shared/units.js';
import type { BudgetResult, ScenarioResult } from './budget-compute.js';
import type { NutrientAmounts } from './nutrients.js';
import type { MixResult } from './product-mix.js';

const lb = (kg: number) => inUnitSystem(kg, 'kg', 'us').value;
const st = (t: number) => inUnitSystem(t, 't', 'us').value;
const perSt = (perT: number) => inUnitSystem(perT, 'per t', 'us').value;
const perLb = (perKg: number) => inUnitSystem(perKg, 'per kg', 'us').value;

function amounts(a: NutrientAmounts): NutrientAmounts {
  return { nitrogen: lb(a.nitrogen), phosphate: lb(a.phosphate), potash: lb(a.potash) };
}

function mix(m: MixResult): MixResult {
  return {
    ...m,
    demand: amounts(m.demand),
    supply: amounts(m.supply),
    overSupply: amounts(m.overSupply),
    lpOverSupply: amounts(m.lpOverSupply),
    lines: m.lines.map((l) => ({ ...l, pricePerT: perSt(l.pricePerT), lotT: st(l.lotT), lpTonnes: st(l.lpTonnes), tonnes: st(l.tonnes), supplies: amounts(l.supplies) })),
  };
}

function scenario(s: ScenarioResult): ScenarioResult {
  return {
    ...s,
    productPrices: s.productPrices.map((p) => ({ ...p, pricePerT: perSt(p.pricePerT) })),
    demand: amounts(s.demand),
    demandElements: { p: lb(s.demandElements.p), k: lb(s.demandElements.k) },
    modelDemand: s.modelDemand ? amounts(s.modelDemand) : null,
    mix: mix(s.mix),
    cash: {
      ...s.cash,
      months: s.cash.months.map((m) => ({ ...m, bookedTonnes: st(m.bookedTonnes) })),
      tranches: s.cash.tranches.map((t) => ({ ...t, tonnes: st(t.tonnes) })),
    },
  };
}

export interface DisplayedBudgetResult extends BudgetResult {
  unitSystem: UnitSystem;
}

/**
 * The result in `system`. Field names keep their metric spelling (pricePerT, lotT, tonnes);
 * `units` says what they hold: in US units "t" fields hold short tons and "kg" fields pounds.
 */
export function inUnits(result: BudgetResult, system: UnitSystem): DisplayedBudgetResult {
  if (system === 'metric') return { ...result, unitSystem: 'metric' };
  const detail = result.source.detail as { farms?: { demand: NutrientAmounts }[]; bands?: Record<string, { p5: number; p95: number }>; outlookDemand?: NutrientAmounts };
  const shownDetail: Record<string, unknown> = { ...result.source.detail };
  if (detail.farms) shownDetail.farms = detail.farms.map((f) => ({ ...f, demand: amounts(f.demand) }));
  if (detail.outlookDemand) shownDetail.outlookDemand = amounts(detail.outlookDemand);
  if (detail.bands) shownDetail.bands = Object.fromEntries(Object.entries(detail.bands).map(([k, b]) => [k, { p5: lb(b.p5), p95: lb(b.p95) }]));
  return {
    ...result,
    unitSystem: 'us',
    units: { nutrient: 'lb', product: 'short ton', price: `${result.currency} per short ton` },
    source: { ...result.source, detail: shownDetail },
    demand: { ...result.demand, base: amounts(result.demand.base), elements: { p: lb(result.demand.elements.p), k: lb(result.demand.elements.k) } },
    referencePrices: {
      ...result.referencePrices,
      values: {
        nitrogen: result.referencePrices.values.nitrogen === null ? null : perLb(result.referencePrices.values.nitrogen),
        phosphate: result.referencePrices.values.phosphate === null ? null : perLb(result.referencePrices.values.phosphate),
        potash: result.referencePrices.values.potash === null ? null : perLb(result.referencePrices.values.potash),
      },
    },
    pricing: result.pricing ? { ...result.pricing, gaps: result.pricing.gaps.map((g) => ({ ...g, list: perLb(g.list), target: perLb(g.target), gap: perLb(g.gap) })) } : result.pricing,
    products: result.products.map((p) => ({
      ...p,
      pricePerT: perSt(p.pricePerT),
      ...(p.listPricePerT === undefined ? {} : { listPricePerT: perSt(p.listPricePerT) }),
      lotT: st(p.lotT),
      costPerKg: {
        nitrogen: p.costPerKg.nitrogen === null ? null : perLb(p.costPerKg.nitrogen),
        phosphate: p.costPerKg.phosphate === null ? null : perLb(p.costPerKg.phosphate),
        potash: p.costPerKg.potash === null ? null : perLb(p.costPerKg.potash),
      },
    })),
    scenarios: result.scenarios.map(scenario),
  };
}
