/**
 * Price scenarios. A scenario changes nutrient prices by Δ_j % (nitrogen, phosphate, potash) and,
 * optionally, single products' prices. It moves the budget two ways:
 *
 * 1. Demand. Around the base point the nutrient demands respond with the model's own- and
 *    cross-price elasticities e_ij (∂ln x_i/∂ln p_j), in the constant-elasticity form
 *        x_i' = x_i · Π_j (1 + Δ_j/100)^{e_ij},
 *    which is exact to first order (ln x_i' − ln x_i = Σ_j e_ij ln(1+Δ_j)) and keeps demand positive.
 *    It is an approximation: the fitted profit function's elasticities themselves change with
 *    prices, so for a model-run or outlook budget the exact re-evaluation is shown beside it.
 * 2. Product prices. A product's price changes by the value-weighted change of the nutrients it
 *    carries, Δ_p = Σ_j w_pj Δ_j with w_pj = g_pj r_j / Σ_k g_pk r_k (g grade %, r reference price
 *    per kg of nutrient), so urea follows the N change fully and DAP by its N and P2O5 value shares.
 *    An explicit product price change overrides this.
 */
import type { ElasticityMatrix, PriceChanges } from '../../shared/budget-types.js';
import { BudgetInputError, GRADE_FIELD, kgPerTonne, NUTRIENT_LABEL, NUTRIENTS, type Graded, type Nutrient, type NutrientAmounts } from './nutrients.js';


/** Nutrient demand after price changes, by the constant-elasticity approximation. */
export function respondDemand(base: NutrientAmounts, elasticities: ElasticityMatrix | null, changes: PriceChanges): NutrientAmounts {
  const out = { ...base };
  if (!elasticities) return out;
  for (const i of NUTRIENTS) {
    let f = 1;
    for (const j of NUTRIENTS) {
      const d = changes[j] ?? 0;
      if (!(d > -100)) throw new BudgetInputError(`A price change must be above −100 %, got ${d} % for ${j}`, `scenarios.priceChanges.${j}`);
      f *= (1 + d / 100) ** elasticities[i][j];
    }
    out[i] = base[i] * f;
  }
  return out;
}
export type { ElasticityMatrix, PriceChanges } from '../../shared/budget-types.js';

/** One part of a demand total with its own elasticities (e.g. the contracting farms, and the rest). */
export interface DemandPart {
  demand: NutrientAmounts;
  elasticities: ElasticityMatrix;
}

/**
 * Elasticities of a sum of parts: e_ij = Σ_k x_ki e_kij / Σ_k x_ki (∂ln Σ_k x_ki/∂ln p_j; exact at the
 * base point). A part with no demand of a nutrient adds nothing to that row.
 */
export function elasticitiesOfSum(parts: DemandPart[]): ElasticityMatrix {
  const out = {} as ElasticityMatrix;
  for (const i of NUTRIENTS) {
    const total = parts.reduce((a, p) => a + p.demand[i], 0);
    out[i] = {} as Record<Nutrient, number>;
    for (const j of NUTRIENTS) out[i][j] = total > 0 ? parts.reduce((a, p) => a + p.demand[i] * p.elasticities[i][j], 0) / total : 0;
  }
  return out;
}


export interface ReferencePrices {
  /** Per kg of N, P2O5, K2O; null for a nutrient no product carries. */
  values: Record<Nutrient, number | null>;
  basis: 'given' | 'model-run' | 'products';
}

/**
 * Reference prices per kg of nutrient from the products alone: a nutrient carried by single-nutrient
 * products is priced at the cheapest of them; a nutrient only found in multi-nutrient products
 * (P2O5 in MAP/DAP) at the cheapest residual after valuing the other nutrients at their prices —
 * the usual way of pricing the P in DAP "net of its N". Repeats until nothing changes.
 */
export function referencePricesFromProducts(products: (Graded & { pricePerT: number })[]): Record<Nutrient, number | null> {
  const r: Record<Nutrient, number | null> = { nitrogen: null, phosphate: null, potash: null };
  const carries = (p: Graded) => NUTRIENTS.filter((n) => p[GRADE_FIELD[n]] > 0);
  for (const n of NUTRIENTS) {
    const single = products.filter((p) => carries(p).length === 1 && carries(p)[0] === n);
    if (single.length) r[n] = Math.min(...single.map((p) => p.pricePerT / kgPerTonne(p, n)));
  }
  for (let round = 0; round < NUTRIENTS.length; round++) {
    let changed = false;
    for (const n of NUTRIENTS) {
      if (r[n] !== null) continue;
      const residuals = products
        .filter((p) => kgPerTonne(p, n) > 0 && carries(p).every((m) => m === n || r[m] !== null))
        .map((p) => (p.pricePerT - carries(p).filter((m) => m !== n).reduce((a, m) => a + kgPerTonne(p, m) * r[m]!, 0)) / kgPerTonne(p, n))
        .filter((v) => v > 0);
      if (residuals.length) {
        r[n] = Math.min(...residuals);
        changed = true;
      }
    }
    if (!changed) break;
  }
  // A nutrient only in products whose other nutrients are unpriced: value each product's nutrients equally per kg.
  for (const n of NUTRIENTS)
    if (r[n] === null) {
      const ps = products.filter((p) => kgPerTonne(p, n) > 0);
      if (ps.length) r[n] = Math.min(...ps.map((p) => p.pricePerT / carries(p).reduce((a, m) => a + kgPerTonne(p, m), 0)));
    }
  return r;
}

/** Value shares w_pj of a product's nutrients at the reference prices (they sum to 1). */
export function valueShares(product: Graded, reference: Record<Nutrient, number | null>): Record<Nutrient, number> {
  const values = NUTRIENTS.map((n) => {
    const g = kgPerTonne(product, n);
    if (g === 0) return 0;
    const r = reference[n];
    if (r === null || !(r > 0)) throw new BudgetInputError(`No reference price for ${NUTRIENT_LABEL[n]}, so a price scenario cannot be applied to the products carrying it`, `options.referencePrices.${n}`);
    return g * r;
  });
  const total = values.reduce((a, b) => a + b, 0);
  return { nitrogen: values[0]! / total, phosphate: values[1]! / total, potash: values[2]! / total };
}

/** A product's price change in % for nutrient price changes (or the explicit override). */
export function productPriceChangePct(product: Graded, reference: Record<Nutrient, number | null>, changes: PriceChanges, override?: number): number {
  if (override !== undefined) return override;
  if (NUTRIENTS.every((n) => !(changes[n] ?? 0))) return 0;
  const w = valueShares(product, reference);
  return NUTRIENTS.reduce((a, n) => a + w[n] * (changes[n] ?? 0), 0);
}

/** Per nutrient: the product list's own price per kg, a target (e.g. an outlook scenario's), and their gap. */
export interface PriceGap {
  nutrient: Nutrient;
  list: number;
  target: number;
  /** target − list, per kg of nutrient. */
  gap: number;
}

/**
 * Reprices products so that the nutrients they carry cost the target prices per kg: with the list's
 * own prices r_j (referencePricesFromProducts) the nutrient changes are Δ_j = 100 (t_j / r_j − 1)
 * and each product moves by its value-weighted Δ (productPriceChangePct). The cheapest
 * single-nutrient product then costs exactly t_j per kg; dearer forms keep their premium in %.
 * A nutrient without a target or without a list price is left as listed.
 */
export function alignToNutrientPrices<P extends Graded & { pricePerT: number }>(
  products: P[],
  target: Partial<Record<Nutrient, number>>,
): { products: (P & { changePct: number })[]; changes: PriceChanges; gaps: PriceGap[] } {
  const list = referencePricesFromProducts(products);
  const changes: PriceChanges = {};
  const gaps: PriceGap[] = [];
  for (const n of NUTRIENTS) {
    const r = list[n];
    const t = target[n];
    if (r === null || !(r > 0) || t === undefined || !(t > 0)) continue;
    changes[n] = 100 * (t / r - 1);
    gaps.push({ nutrient: n, list: r, target: t, gap: t - r });
  }
  return {
    products: products.map((p) => {
      const changePct = productPriceChangePct(p, list, changes);
      return { ...p, pricePerT: p.pricePerT * (1 + changePct / 100), changePct };
    }),
    changes,
    gaps,
  };
}
