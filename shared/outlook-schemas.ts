/**
 * Request schemas of the outlook API (season outlook, issue 6). The client may import them by
 * relative path; they could move to shared/ with the rest of the shared schemas.
 */
import { z } from 'zod';
import { idSchema, idTextSchema } from './ids.js';
import { currencySchema, numberInMessage, TEXT_MAX } from './field-limits.js';

const itemCode = z.string().trim().min(1, 'Name the item').max(TEXT_MAX.code);
const positive = (what: string) => z.number({ error: `Enter ${what}` }).positive(`${what[0]!.toUpperCase()}${what.slice(1)} must be more than 0`).max(1e9);

export const seasonLabelSchema = z
  .string({ error: 'Name the season, e.g. 2026/27' })
  .trim()
  .regex(/^\d{4}\/\d{2}$/, 'Use a season label such as 2026/27')
  .refine((s) => (Number(s.slice(0, 4)) + 1) % 100 === Number(s.slice(5)), 'The second year must follow the first, e.g. 2026/27');

export const methodSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('last') }),
    z.object({
      kind: z.literal('moving-average'),
      k: z.number().int('k must be a whole number').min(2, 'Average at least 2 seasons').max(20, 'Average at most 20 seasons'),
      olympic: z.boolean().default(false),
    }),
    z.object({ kind: z.literal('trend'), seasons: z.number().int().min(3, 'A trend needs at least 3 seasons').max(50).default(10) }),
    z.object({ kind: z.literal('adaptive'), lambda: z.number().gt(0, 'λ must be above 0').lte(1, 'λ must be at most 1') }),
    z.object({
      kind: z.literal('futures-basis'),
      contract: z.string().trim().min(1).max(80).nullable().default(null),
      basisSeasons: z.number().int().min(1).max(10).default(5),
    }),
    z.object({ kind: z.literal('manual'), value: positive('the expected price') }),
  ],
  { error: 'Choose a method: last, moving-average, trend, adaptive, futures-basis or manual' },
);

export const bandSchema = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('errors'), k: z.number().positive('k must be more than 0').max(5).default(1) }),
    z.object({ kind: z.literal('percent'), pct: z.number().positive('The percentage must be more than 0').lt(100, 'The percentage must be below 100') }),
    z.object({ kind: z.literal('manual'), low: positive('the low price'), high: positive('the high price') }),
  ],
  { error: 'Choose a band: errors, percent or manual' },
);

export const expectationSettingSchema = z.object({
  item: itemCode,
  method: methodSchema,
  band: bandSchema.optional(),
  note: z.string().trim().max(TEXT_MAX.expectationNote).optional(),
});

export const expectationsBodySchema = z
  .object({ items: z.array(expectationSettingSchema).min(1, 'Set at least one item').max(30) })
  .refine((v) => new Set(v.items.map((i) => i.item)).size === v.items.length, { message: 'An item is set twice', path: ['items'] });

export const outlookCreateSchema = z.object({
  season: seasonLabelSchema,
  title: z.string().trim().min(1).max(TEXT_MAX.outlookTitle).optional(),
  modelRunId: idSchema.nullable().optional(),
});

export const outlookPatchSchema = z
  .object({
    title: z.string().trim().min(1, 'Enter a title').max(TEXT_MAX.outlookTitle),
    modelRunId: idSchema.nullable(),
    commentary: z.string().max(TEXT_MAX.outlookCommentary, `Keep the commentary under ${numberInMessage(TEXT_MAX.outlookCommentary)} characters`),
    scenarioRule: z.enum(['margin', 'uniform']),
    draws: z.number().int().min(500, 'Use at least 500 draws').max(20000, 'Use at most 20,000 draws'),
    seed: z.number().int().min(1).max(2 ** 31 - 1),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change');

export const publishSchema = z.object({
  /** Replaces the draft's commentary before publishing, when given. */
  commentary: z.string().max(TEXT_MAX.outlookCommentary).optional(),
  /** false: publish without e-mailing members (e.g. an outlook entered after its season). */
  notifyMembers: z.boolean().default(true),
  /** The planner publishes although the model did not beat the plain per-hectare rule for some item (the warning is kept). */
  acceptWeakSkill: z.boolean().default(false),
});

export const methodCompareQuerySchema = z.object({ item: itemCode });

export const futuresQuoteSchema = z.object({
  itemId: idSchema,
  seasonId: idSchema,
  contract: z.string({ error: 'Name the contract' }).trim().min(1, 'Name the contract').max(80),
  quote: positive('the quote'),
  currency: currencySchema,
  quotedOn: z.iso.date('Use a date such as 2026-11-20'),
  source: z.string().trim().min(1, 'Name the source').max(TEXT_MAX.source),
});

export const futuresListQuerySchema = z.object({
  itemId: idTextSchema.optional(),
  seasonId: idTextSchema.optional(),
});

export const versionParamSchema = z.object({ versionId: idTextSchema });
export const deliveriesQuerySchema = z.object({ version: idTextSchema.optional() });
export const deliveryParamsSchema = z.object({ id: idTextSchema, deliveryId: idTextSchema });
export const accountabilityQuerySchema = z.object({ version: z.enum(['latest', 'first']).default('latest') });

export const mailPreferencesSchema = z.object({ outlookEmails: z.boolean({ error: 'Say true or false' }) });
export const unsubscribeParamSchema = z.object({ token: z.string().min(1).max(400) });
