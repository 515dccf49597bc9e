import { z } from 'zod';
import { idSchema } from './ids.js';
import { currencySchema, SEASON_LABEL_MIN, SEASON_YEARS, TEXT_MAX, VALUE_MAX } from './field-limits.js';

const code = z
  .string({ error: 'Enter a code' })
  .trim()
  .min(1, 'Enter a code')
  .max(TEXT_MAX.code)
  .regex(/^[a-z0-9][a-z0-9_-]*$/i, 'Use letters, digits, - and _ only');
const name = z.string({ error: 'Enter a name' }).trim().min(1, 'Enter a name').max(TEXT_MAX.name);
const pct = z.number().min(0, 'A percentage cannot be negative').max(100, 'A percentage cannot exceed 100').nullable().optional();
const isoDate = z.iso.date('Use a date such as 2024-08-15');

export const itemSchema = z
  .object({
    code,
    name,
    role: z.enum(['output', 'input']),
    category: z.enum(['grain', 'oilseed', 'fertiliser', 'fuel', 'labour', 'other']),
    unit: z.string().trim().min(1, 'Enter a unit').max(TEXT_MAX.unit),
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
  label: z.string().trim().min(SEASON_LABEL_MIN).max(TEXT_MAX.seasonLabel),
  startYear: z.number().int().min(SEASON_YEARS.min).max(SEASON_YEARS.max),
  startMonth: z.number().int().min(1).max(12),
});

export const deliveryPointSchema = z.object({
  name,
  kind: z.enum(['delivery point', 'region']),
  region: z.string().trim().min(1).max(TEXT_MAX.name),
});

export const farmSchema = z.object({
  code,
  name,
  region: z.string().trim().min(1, 'Enter a region').max(TEXT_MAX.name),
  landHa: z.number({ error: 'Enter the land in hectares' }).positive('Land must be more than 0 ha').max(VALUE_MAX.landHa),
});

export const priceSchema = z.object({
  itemId: idSchema,
  seasonId: idSchema,
  deliveryPointId: idSchema,
  price: z.number({ error: 'Enter a price' }).positive('A price must be more than 0').max(VALUE_MAX.price),
  currency: currencySchema,
  source: z.string().trim().min(1, 'Name the source').max(TEXT_MAX.source),
  observedOn: isoDate,
});
export type PriceInput = z.infer<typeof priceSchema>;

export const recordSchema = z.object({
  farmId: idSchema,
  seasonId: idSchema,
  itemId: idSchema,
  quantity: z.number({ error: 'Enter a quantity' }).nonnegative('A quantity cannot be negative').max(VALUE_MAX.quantity),
});

/** A fixed factor's name as stored (land is `land_ha`): lower case, digits and underscores, as long as a code. */
export const FACTOR_NAME = new RegExp(`^[a-z][a-z0-9_]{0,${TEXT_MAX.code - 1}}$`);
export const factorNameSchema = z
  .string()
  .trim()
  .regex(FACTOR_NAME, `Use lower-case letters, digits and _ (up to ${TEXT_MAX.code}), starting with a letter, e.g. irrigated_ha`);

/** One farm's level of one fixed factor in one season (land in ha, irrigated area, machinery value, …). */
export const factorValueSchema = z.object({
  farmId: idSchema,
  seasonId: idSchema,
  factor: factorNameSchema,
  value: z.number().finite().min(0, 'A fixed factor cannot be negative').max(VALUE_MAX.factor),
});
export const factorKeySchema = factorValueSchema.pick({ farmId: true, seasonId: true, factor: true });

export const landSchema = z.object({
  farmId: idSchema,
  seasonId: idSchema,
  landHa: z.number().positive('Land must be more than 0 ha').max(VALUE_MAX.landHa),
});

export const priceIndexSchema = z.object({
  name,
  base: z.string().trim().min(1).max(TEXT_MAX.indexBase),
  source: z.string().trim().min(1).max(TEXT_MAX.source),
  values: z.array(z.object({ seasonId: idSchema, value: z.number().positive() })).max(500),
});
export type PriceIndexInput = z.infer<typeof priceIndexSchema>;
