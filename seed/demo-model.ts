import type { z } from 'zod';
import type { modelDefinitionSchema } from '../shared/model-schemas.js';

/** A definition as POST /api/models takes it (the schema fills what is left out). */
type ModelDefinition = z.input<typeof modelDefinitionSchema>;

/**
 * The demo co-op's model, as the tests, browser flows and benchmarks define it: all seven items,
 * hired labour as the numeraire, land as the fixed factor, a trend, the normalised quadratic form.
 */
export const DEMO_MODEL: ModelDefinition = {
  items: ['wheat', 'canola', 'nitrogen', 'phosphate', 'potash', 'diesel', 'labour'],
  numeraire: 'labour',
  fixedFactors: ['land_ha'],
  trend: true,
  form: 'nq',
  curvature: 'auto',
  fromSeason: null,
  toSeason: null,
  farms: null,
  // The product's default back-test (the last 5 seasons), so an outlook can say how well the run
  // forecast and warn before publishing; seed/demo-coop.test.ts checks the demo's skill over the same 5.
  backtestSeasons: 5,
};

/** The demo model with some choices changed. */
export function demoModel(changes: Partial<ModelDefinition> = {}): ModelDefinition {
  return { ...DEMO_MODEL, ...changes };
}
