/**
 * Least-cost fertiliser product mix: the linear program
 *
 *   minimise   Σ_p c_p x_p                       (c_p price per t of product p, x_p tonnes)
 *   subject to Σ_p 10·g_pj x_p ≥ d_j  for j ∈ {N, P2O5, K2O}   (g_pj grade %, d_j kg of nutrient)
 *              x_p ≥ 0
 *
 * solved with javascript-lp-solver. Every product counts towards every nutrient it carries, so the
 * nitrogen in MAP and DAP is credited against the N need. Tonnes are then bought in whole delivery
 * lots, either by rounding each product up to its next lot ('round-up') or by solving the same
 * program in whole lots (an integer program, 'whole-lots'), which may choose a different, cheaper mix.
 */
import type { LotRule, MixLine, MixResult } from '../../shared/budget-types.js';
import lpSolver, { type Model, type SolveResult, type SolverAPI } from 'javascript-lp-solver';
import { BudgetInputError, gradeLabel, kgPerTonne, NUTRIENT_LABEL, NUTRIENTS, zeroAmounts, type Graded, type Nutrient, type NutrientAmounts } from './nutrients.js';

export type { LotRule, MixLine, MixResult } from '../../shared/budget-types.js';

/**
 * javascript-lp-solver 1.0.3 ships an ES module whose default export is the solver, but its one
 * type file is read as CommonJS under NodeNext, so TypeScript types the default import as the
 * module object. Take the solver from whichever shape is loaded.
 */
const solver: SolverAPI = 'Solve' in lpSolver ? (lpSolver as unknown as SolverAPI) : (lpSolver as unknown as { default: SolverAPI }).default;

export interface MixProduct extends Graded {
  productId: number;
  name: string;
  /** Price per tonne of product, in the budget's currency. */
  pricePerT: number;
  /** Delivery lot in tonnes of product. */
  lotT: number;
}

/** Values below this many tonnes are solver noise (it reports 8 decimals). */
const EPS_T = 1e-7;

function lpModel(demand: NutrientAmounts, products: MixProduct[], scale: (p: MixProduct) => number): Model {
  const variables: Model['variables'] = {};
  products.forEach((p, i) => {
    const s = scale(p);
    const v: Record<string, number> = { cost: p.pricePerT * s };
    for (const n of NUTRIENTS) if (kgPerTonne(p, n) > 0) v[n] = kgPerTonne(p, n) * s;
    variables[`x${i}`] = v;
  });
  const constraints: Model['constraints'] = {};
  for (const n of NUTRIENTS) if (demand[n] > 0) constraints[n] = { min: demand[n] };
  return { optimize: 'cost', opType: 'min', constraints, variables };
}

function validate(demand: NutrientAmounts, products: MixProduct[]) {
  for (const n of NUTRIENTS) {
    if (!(Number.isFinite(demand[n]) && demand[n] >= 0)) throw new BudgetInputError(`The ${NUTRIENT_LABEL[n]} need must be a number ≥ 0 kg, got ${demand[n]}`, `demand.${n}`);
    if (demand[n] > 0 && !products.some((p) => kgPerTonne(p, n) > 0))
      throw new BudgetInputError(`No product in the budget supplies ${NUTRIENT_LABEL[n]}, but ${Math.round(demand[n])} kg ${NUTRIENT_LABEL[n]} are needed; add a product that carries it`, 'products');
  }
  products.forEach((p, i) => {
    if (!(p.pricePerT > 0)) throw new BudgetInputError(`${p.name}: the price per tonne must be above 0`, `products.${i}.pricePerT`);
    if (!(p.lotT > 0)) throw new BudgetInputError(`${p.name}: the lot size must be above 0 t`, `products.${i}.lotT`);
  });
}

function supplied(products: MixProduct[], tonnes: number[]): NutrientAmounts {
  const s = zeroAmounts();
  products.forEach((p, i) => {
    for (const n of NUTRIENTS) s[n] += kgPerTonne(p, n) * tonnes[i]!;
  });
  return s;
}

/** Supply beyond the need; below 1 g it is the solver's 8-decimal rounding and counts as none. */
function excess(supply: NutrientAmounts, demand: NutrientAmounts): NutrientAmounts {
  const over = (n: Nutrient) => {
    const d = supply[n] - demand[n];
    return d > 1e-3 ? d : 0;
  };
  return { nitrogen: over('nitrogen'), phosphate: over('phosphate'), potash: over('potash') };
}

/** The least-cost continuous mix: tonnes of each product (in the order given) and its cost. */
export function leastCostTonnes(demand: NutrientAmounts, products: MixProduct[]): { tonnes: number[]; cost: number } {
  validate(demand, products);
  if (NUTRIENTS.every((n) => demand[n] === 0)) return { tonnes: products.map(() => 0), cost: 0 };
  const res = solver.Solve(lpModel(demand, products, () => 1)) as SolveResult;
  if (!res.feasible) throw new BudgetInputError('The products cannot meet the nutrient need (the linear program is infeasible)', 'products');
  const tonnes = products.map((_, i) => {
    const v = Number(res[`x${i}`] ?? 0);
    return v > EPS_T ? v : 0;
  });
  return { tonnes, cost: tonnes.reduce((a, t, i) => a + t * products[i]!.pricePerT, 0) };
}

/** Whole lots of each product that meet the need at least cost (integer program), or null if the solver gives up. */
function leastCostLots(demand: NutrientAmounts, products: MixProduct[]): number[] | null {
  const model = lpModel(demand, products, (p) => p.lotT);
  model.ints = Object.fromEntries(products.map((_, i) => [`x${i}`, 1]));
  // A budget has a handful of products, so the search ends in milliseconds; the cap keeps a pathological case short.
  model.options = { timeout: 1000 };
  const res = solver.Solve(model) as SolveResult;
  if (!res.feasible || res.isIntegral === false) return null;
  const lots = products.map((_, i) => Math.round(Number(res[`x${i}`] ?? 0)));
  // Trust only a plan that really meets every need in whole lots.
  const supply = supplied(products, lots.map((k, i) => k * products[i]!.lotT));
  return NUTRIENTS.every((n) => supply[n] >= demand[n] - 1e-6) ? lots : null;
}

/** Lots needed to hold `tonnes`, rounding up (a hair of solver noise does not start a new lot). */
export function lotsFor(tonnes: number, lotT: number): number {
  if (tonnes <= EPS_T) return 0;
  return Math.ceil(tonnes / lotT - 1e-9);
}

/** The least-cost product mix for a nutrient need, bought in whole delivery lots. */
export function solveProductMix(demand: NutrientAmounts, products: MixProduct[], lotRule: LotRule = 'round-up'): MixResult {
  const warnings: string[] = [];
  const lp = leastCostTonnes(demand, products);
  let lots = products.map((p, i) => lotsFor(lp.tonnes[i]!, p.lotT));
  if (lotRule === 'whole-lots' && lp.cost > 0) {
    const whole = leastCostLots(demand, products);
    const cost = (ls: number[]) => ls.reduce((a, k, i) => a + k * products[i]!.lotT * products[i]!.pricePerT, 0);
    if (!whole) warnings.push('The whole-lot program did not finish; each product of the least-cost mix is rounded up to whole lots instead');
    else if (cost(whole) > cost(lots) + 1e-6) warnings.push('The whole-lot program found no cheaper plan than rounding up; each product is rounded up to whole lots');
    else lots = whole;
  }
  const bought = lots.map((k, i) => k * products[i]!.lotT);
  const supply = supplied(products, bought);
  const lines: MixLine[] = products
    .map((p, i) => ({
      productId: p.productId,
      name: p.name,
      grade: gradeLabel(p),
      pricePerT: p.pricePerT,
      lotT: p.lotT,
      lpTonnes: lp.tonnes[i]!,
      lots: lots[i]!,
      tonnes: bought[i]!,
      cost: bought[i]! * p.pricePerT,
      supplies: supplied([p], [bought[i]!]),
    }))
    .filter((l) => l.lots > 0 || l.lpTonnes > 0);
  return {
    lotRule,
    demand: { ...demand },
    lines,
    lpCost: lp.cost,
    cost: lines.reduce((a, l) => a + l.cost, 0),
    supply,
    overSupply: excess(supply, demand),
    lpOverSupply: excess(supplied(products, lp.tonnes), demand),
    warnings,
  };
}
