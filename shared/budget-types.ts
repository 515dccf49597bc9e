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
