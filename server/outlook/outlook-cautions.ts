/**
 * The cautions every published outlook carries (docs/forecasting.md §8); they are copied
 * into each version's snapshot so a version reads the same years later.
 */
import { PROJECTION_CAUTION } from '../estimation/index.js';

export const OUTLOOK_CAUTIONS: string[] = [
  PROJECTION_CAUTION,
  'The figures rest on the expected prices shown and on relationships in past seasons, which change with policy, technology and the structure of farming. The model assumes that farms take prices as given and maximise profit.',
  'Expected prices are uncertain: quotes made before the season have often been poor forecasts of the harvest price. Read the low and high scenarios and the likely ranges (the bands), not only the base figure.',
  'Input demand is an economic total for the co-op’s supply planning, not a rate for any field. Fertiliser rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.',
  'Fertiliser quantities are nutrients (kg N, kg P2O5, kg K2O), not tonnes of product.',
  'About twenty seasons of records give imprecise responses to price; results also differ with the functional form and the numeraire of the model.',
];

/** A caution added when parameter draws break convexity at the scenario prices. */
export function curvatureCaution(worstShare: number): string | null {
  if (!(worstShare > 0.05)) return null;
  return `${Math.round(100 * worstShare)} % of the simulated parameter sets break the convexity a profit function must have at these prices; read the bands with extra care.`;
}
