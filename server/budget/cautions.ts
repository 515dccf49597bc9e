import { PROJECTION_CAUTION } from '../estimation/index.js';

/**
 * Shown with every budget, on the page and as rows of every export (domain.md §3, "Usual cautions";
 * NRCS Conservation Practice Standard 590 asks for rates from soil tests and land-grant guidance,
 * and for certified reviewers of nutrient-management plans).
 */
export const BUDGET_CAUTIONS: readonly string[] = [
  'This budget sizes the co-op’s fertiliser purchases. It is not an application recommendation for any field, farm or crop.',
  'Application rates follow soil tests, local agronomic guidance and nutrient-management rules; a certified adviser (for example a Certified Crop Adviser or a state-certified nutrient-management planner) decides.',
  PROJECTION_CAUTION,
  'Nutrients are in kg N, kg P2O5 and kg K2O (oxide basis, as grades are written); P and K are elemental only where labelled so. Product tonnes are tonnes of product, not of nutrient.',
];

/** How the scenario figures are made, for the page and the exports. */
export const BUDGET_METHOD_NOTES: readonly string[] = [
  'Least-cost product mix: a linear program (javascript-lp-solver) that meets each nutrient need and counts every nutrient a product carries, so the N in MAP and DAP is credited.',
  'Scenario demand: x_i × Π_j (1 + Δp_j)^e_ij with the co-op’s own- and cross-price elasticities at the base point — a constant-elasticity approximation; for a model run or a published outlook the model re-evaluated exactly at the changed prices is shown beside it.',
  'A nutrient price change moves each product’s price by the value share of that nutrient in the product at the reference prices per kg of nutrient.',
];
