import { k2oToK, p2o5ToP } from '../../shared/units.js';

import { NUTRIENTS, type Nutrient, type NutrientAmounts } from '../../shared/budget-types.js';

export { NUTRIENT_LABEL, NUTRIENTS, type Nutrient, type NutrientAmounts } from '../../shared/budget-types.js';

/** The grade column of a product for each nutrient. */
export const GRADE_FIELD = { nitrogen: 'nPct', phosphate: 'p2o5Pct', potash: 'k2oPct' } as const;

export interface Graded {
  nPct: number;
  p2o5Pct: number;
  k2oPct: number;
}

/** kg of the nutrient in one tonne of product: grade % × 10. */
export function kgPerTonne(product: Graded, nutrient: Nutrient): number {
  return product[GRADE_FIELD[nutrient]] * 10;
}

export function gradeLabel(p: Graded): string {
  const f = (x: number) => (Number.isInteger(x) ? String(x) : String(Math.round(x * 10) / 10));
  return `${f(p.nPct)}-${f(p.p2o5Pct)}-${f(p.k2oPct)}`;
}

export const zeroAmounts = (): NutrientAmounts => ({ nitrogen: 0, phosphate: 0, potash: 0 });

export function mapAmounts(a: NutrientAmounts, f: (v: number, n: Nutrient) => number): NutrientAmounts {
  return { nitrogen: f(a.nitrogen, 'nitrogen'), phosphate: f(a.phosphate, 'phosphate'), potash: f(a.potash, 'potash') };
}

/** Elemental P and K (kg) of an oxide-basis amount, for showing beside P2O5 and K2O. */
export function elementsOf(a: NutrientAmounts): { p: number; k: number } {
  return { p: p2o5ToP(a.phosphate), k: k2oToK(a.potash) };
}

/** An input the budget cannot work with: a 422 with the field it concerns. */
export class BudgetInputError extends Error {
  constructor(
    message: string,
    readonly path?: string,
  ) {
    super(message);
    this.name = 'BudgetInputError';
  }
}

/**
 * kg of N, P2O5 and K2O in a quantity of a farm item counted by mass (kg or t) with a grade, as the
 * outlook and the farm records count fertiliser; null for an item without a grade or not by mass.
 */
export function itemNutrients(item: { unit: string; nPct: number | null; p2o5Pct: number | null; k2oPct: number | null }, quantity: number): NutrientAmounts | null {
  const unit = item.unit.trim().toLowerCase();
  const mass = /^kg\b/.test(unit) ? 1 : /^(t|tonnes?)\b/.test(unit) ? 1000 : null;
  const pct: Record<Nutrient, number | null> = { nitrogen: item.nPct, phosphate: item.p2o5Pct, potash: item.k2oPct };
  if (mass === null || !NUTRIENTS.some((n) => (pct[n] ?? 0) > 0)) return null;
  return mapAmounts(zeroAmounts(), (_v, n) => (pct[n] ? (quantity * mass * pct[n]!) / 100 : 0));
}
