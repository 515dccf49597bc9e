import { z } from 'zod';
import { idSchema } from './ids.js';

const code = z
  .string({ error: 'Enter a code' })
  .trim()
  .min(1, 'Enter a code')
  .max(40)
  .regex(/^[a-z0-9][a-z0-9_-]*$/i, 'Use letters, digits, - and _ only');
const name = z.string({ error: 'Enter a name' }).trim().min(1, 'Enter a name').max(120);
const pct = z.number().min(0, 'A percentage cannot be negative').max(100, 'A percentage cannot exceed 100').nullable().optional();
const isoDate = z.iso.date('Use a date such as 2024-08-15');

export const itemSchema = z
  .object({
    code,
    name,
    role: z.enum(['output', 'input']),
    category: z.enum(['grain', 'oilseed', 'fertiliser', 'fuel', 'labour', 'other']),
    unit: z.string().trim().min(1, 'Enter a unit').max(20),
    nPct: pct,
    p2o5Pct: pct,
    k2oPct: pct,
  })
  .refine((v) => v.category === 'fertiliser' || (v.nPct == null && v.p2o5Pct == null && v.k2oPct == null), {
    message: 'Only fertilisers have an N–P2O5–K2O analysis',
    path: ['category'],
  });
export type ItemInput = z.infer<typeof itemSchema>;

export const seasonSchema = z.object({
  label: z.string().trim().min(4).max(20),
  startYear: z.number().int().min(1900).max(2200),
  startMonth: z.number().int().min(1).max(12),
});

export const deliveryPointSchema = z.object({
  name,
  kind: z.enum(['delivery point', 'region']),
  region: z.string().trim().min(1).max(120),
});

export const farmSchema = z.object({
  code,
  name,
  region: z.string().trim().min(1, 'Enter a region').max(120),
  landHa: z.number({ error: 'Enter the land in hectares' }).positive('Land must be more than 0 ha').max(1e6),
});

export const priceSchema = z.object({
  itemId: idSchema,
  seasonId: idSchema,
  deliveryPointId: idSchema,
  price: z.number({ error: 'Enter a price' }).positive('A price must be more than 0').max(1e9),
  currency: z.string().trim().regex(/^[A-Z]{3}$/, 'Use a three-letter ISO 4217 code such as EUR'),
  source: z.string().trim().min(1, 'Name the source').max(200),
  observedOn: isoDate,
});
export type PriceInput = z.infer<typeof priceSchema>;

export const recordSchema = z.object({
  farmId: idSchema,
  seasonId: idSchema,
  itemId: idSchema,
  quantity: z.number({ error: 'Enter a quantity' }).nonnegative('A quantity cannot be negative').max(1e12),
});

/** A fixed factor's name as stored (land is `land_ha`): lower case, digits and underscores. */
export const factorNameSchema = z
  .string()
  .trim()
  .regex(/^[a-z][a-z0-9_]{0,39}$/, 'Use lower-case letters, digits and _ (up to 40), starting with a letter, e.g. irrigated_ha');

/** One farm's level of one fixed factor in one season (land in ha, irrigated area, machinery value, …). */
export const factorValueSchema = z.object({
  farmId: idSchema,
  seasonId: idSchema,
  factor: factorNameSchema,
  value: z.number().finite().min(0, 'A fixed factor cannot be negative').max(1e9),
});
export const factorKeySchema = factorValueSchema.pick({ farmId: true, seasonId: true, factor: true });

export const landSchema = z.object({
  farmId: idSchema,
  seasonId: idSchema,
  landHa: z.number().positive('Land must be more than 0 ha').max(1e6),
});

export const priceIndexSchema = z.object({
  name,
  base: z.string().trim().min(1).max(60),
  source: z.string().trim().min(1).max(200),
  values: z.array(z.object({ seasonId: idSchema, value: z.number().positive() })).max(500),
});
export type PriceIndexInput = z.infer<typeof priceIndexSchema>;
