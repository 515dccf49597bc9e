import { z } from 'zod';

const itemCode = z.string().trim().min(1).max(40);

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
    fromSeason: z.string().trim().max(20).nullable().default(null),
    toSeason: z.string().trim().max(20).nullable().default(null),
    /** Farm codes in the sample; null means every farm. */
    farms: z.array(z.string().trim().min(1).max(40)).min(1).nullable().default(null),
    /** How many of the last seasons to back-test (rolling origin); 0 turns it off. */
    backtestSeasons: z.number().int().min(0).max(10).default(5),
  })
  .refine((d) => d.items.includes(d.numeraire), { message: 'The numeraire must be one of the chosen items', path: ['numeraire'] })
  .refine((d) => new Set(d.items).size === d.items.length, { message: 'An item is chosen twice', path: ['items'] })
  .refine((d) => new Set(d.fixedFactors).size === d.fixedFactors.length, { message: 'A fixed factor is chosen twice', path: ['fixedFactors'] })
  .refine((d) => !d.fixedFactors.includes('trend'), { message: 'The trend is chosen with its own switch, not as a fixed factor', path: ['fixedFactors'] });
export type ModelDefinition = z.output<typeof modelDefinitionSchema>;

export const modelCreateSchema = z.object({
  name: z.string().trim().min(1, 'Name the model').max(120),
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
