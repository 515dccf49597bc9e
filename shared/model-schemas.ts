import { z } from 'zod';
import { TEXT_MAX } from './field-limits.js';

const itemCode = z.string().trim().min(1).max(TEXT_MAX.code);

/** Most seasons a model run back-tests (rolling origin). */
export const MAX_BACKTEST_SEASONS = 10;

/**
 * How the forecasting model is specified: 'per-hectare' = every netput per hectare of the farm's
 * land, each farm's own level (shrunk toward the others), a season effect shared by all farms and
 * errors that grow with land; 'pooled' = one profit function in levels for every farm, land an
 * ordinary fixed factor.
 */
export const FORECAST_SPECS = ['per-hectare', 'pooled'] as const;
export type ForecastSpecName = (typeof FORECAST_SPECS)[number];

/** The specifications in plain words: a short label and what it means for a farm's forecast. */
export const SPEC_WORDS: Record<ForecastSpecName, { label: string; detail: string }> = {
  'per-hectare': {
    label: 'Per hectare, with farm and season effects',
    detail:
      'Every quantity per hectare of the farm’s land, so a 40 ha farm and a 900 ha farm share one technology; each farm keeps its own level (farms with few seasons lean on the others), a good or bad season moves all farms together, and a larger farm’s figures vary more.',
  },
  pooled: {
    label: 'One equation for all farms (pooled)',
    detail: 'One profit function in farm totals for every farm, land as an ordinary fixed factor; farm and season differences are left to the error.',
  },
};

/** The specification a definition without one gets: per hectare when land is recorded. */
export function defaultSpec(fixedFactors: readonly string[]): ForecastSpecName {
  return fixedFactors.includes('land_ha') ? 'per-hectare' : 'pooled';
}

/** The specification of a stored definition (definitions stored before it was a choice ran pooled). */
export function specOf(def: { spec?: ForecastSpecName | null }): ForecastSpecName {
  return def.spec ?? 'pooled';
}

/** What a planner chooses when defining a model (stored with every run). */
export const modelDefinitionSchema = z
  .object({
    /** Item codes in the model: outputs and inputs. */
    items: z.array(itemCode).min(2, 'Choose at least two items').max(12, 'Choose at most 12 items'),
    numeraire: itemCode,
    /** Quasi-fixed factors from the farm records: land_ha and any other factor recorded per farm and season. */
    fixedFactors: z
      .array(z.string().trim().regex(/^[a-z][a-z0-9_]{0,39}$/, 'A fixed factor is named in lower-case letters, digits and _'))
      .max(4, 'Choose at most 4 fixed factors')
      .default(['land_ha']),
    trend: z.boolean().default(true),
    form: z.enum(['nq', 'gl']).default('nq'),
    curvature: z.enum(['auto', 'impose', 'check']).default('auto'),
    /** First and last season label of the sample (inclusive); null means the data's first or last. */
    fromSeason: z.string().trim().max(TEXT_MAX.seasonLabel).nullable().default(null),
    toSeason: z.string().trim().max(TEXT_MAX.seasonLabel).nullable().default(null),
    /** Farm codes in the sample; null means every farm. */
    farms: z.array(z.string().trim().min(1).max(TEXT_MAX.code)).min(1).nullable().default(null),
    /** How many of the last seasons to back-test (rolling origin); 0 turns it off. */
    backtestSeasons: z.number().int().min(0).max(MAX_BACKTEST_SEASONS).default(5),
    /** The forecasting model's specification; by default per hectare when land is a fixed factor. */
    spec: z.enum(FORECAST_SPECS).optional(),
  })
  .refine((d) => d.items.includes(d.numeraire), { message: 'The numeraire must be one of the chosen items', path: ['numeraire'] })
  .refine((d) => new Set(d.items).size === d.items.length, { message: 'An item is chosen twice', path: ['items'] })
  .refine((d) => new Set(d.fixedFactors).size === d.fixedFactors.length, { message: 'A fixed factor is chosen twice', path: ['fixedFactors'] })
  .refine((d) => !d.fixedFactors.includes('trend'), { message: 'The trend is chosen with its own switch, not as a fixed factor', path: ['fixedFactors'] })
  .refine((d) => d.spec !== 'per-hectare' || d.fixedFactors.includes('land_ha'), {
    message: 'A model per hectare needs land as a fixed factor',
    path: ['spec'],
  })
  .transform((d) => ({ ...d, spec: d.spec ?? defaultSpec(d.fixedFactors) }));
export type ModelDefinition = z.output<typeof modelDefinitionSchema>;

export const modelCreateSchema = z.object({
  name: z.string().trim().min(1, 'Name the model').max(TEXT_MAX.name),
  definition: modelDefinitionSchema,
});

export const evaluateQuerySchema = z.object({
  /** `wheat=210,nitrogen=1.2` */
  prices: z
    .string()
    .max(2000)
    .regex(/^([a-z0-9_-]+=[0-9.eE+-]+)(,[a-z0-9_-]+=[0-9.eE+-]+)*$/i, 'Use item=price pairs separated by commas, e.g. wheat=210,nitrogen=1.2')
    .optional(),
  fixed: z
    .string()
    .max(2000)
    .regex(/^([a-z0-9_-]+=[0-9.eE+-]+)(,[a-z0-9_-]+=[0-9.eE+-]+)*$/i, 'Use name=value pairs separated by commas, e.g. land_ha=400')
    .optional(),
});
