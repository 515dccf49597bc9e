import { PROJECTION_CAUTION } from '../estimation/index.js';

/**
 * Shown with every budget, on the page and as rows of every export (docs/fertiliser.md §7;
 * NRCS Conservation Practice Standard 590 asks for rates from soil tests and land-grant guidance,
 * and for certified reviewers of nutrient-management plans). Worded for any country: the page names
 * no national credential or agency.
 */
export const BUDGET_CAUTIONS: readonly string[] = [
  'This budget sizes the co-op’s fertiliser purchases. It is not an application recommendation for any field, farm or crop.',
  'Application rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.',
  PROJECTION_CAUTION,
  'Nutrients are in kg N, kg P2O5 and kg K2O (oxide basis, as grades are written); P and K are elemental only where labelled so. Product tonnes are tonnes of product, not of nutrient.',
];

/**
 * How the scenario figures are made, for the page and the exports, in plain words (the page adds the
 * scenario formula for planners; server/budget/scenarios.ts has it in full).
 */
export const BUDGET_METHOD_NOTES: readonly string[] = [
  'Product mix: the cheapest mix of the co-op’s products that meets every nutrient need, found by linear programming. Every nutrient a product carries counts, so the nitrogen in MAP and DAP is credited.',
  'Scenario demand: demand moves with each nutrient’s price by the model’s own- and cross-price elasticities, each change compounding (an approximation that holds the elasticities at the base). For a model run or a published outlook, the model worked out again at the changed prices is shown beside it.',
  'A nutrient price change moves each product’s price by that nutrient’s share of the product’s value, at the reference prices per kg of nutrient.',
];
