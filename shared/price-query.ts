/**
 * `GET /api/prices`: one window of the price table, sorted and narrowed on the server, so a table of
 * 238,000 prices is never sent (or built) whole. The prices grid reads it block by block (AG Grid's
 * infinite row model); scripts page with `offset` and `limit`. The answer is the rows as a JSON
 * array; the `X-Total-Count` header holds how many rows match the filters.
 *
 *   offset=0&limit=100             rows 1–100 (limit 1–1,000; 1,000 when absent)
 *   sort=price&dir=desc            one column, ascending unless dir=desc; ties by season, item, point, date
 *   items=1,2&seasons=3&deliveryPoints=4      ids (as before)
 *   q=wheat larkfield 2024-08      every word in the item name or code, season, delivery point, source, currency or date
 *   item=contains:whe  season=equals:2024/25  deliveryPoint=startsWith:North  source=notContains:bench
 *   currency=equals:EUR            text conditions, case-insensitive
 *   price=greaterThan:200  price=inRange:100:250     number conditions (decimal point)
 *
 * Declared once here: the server validates with `priceQuerySchema`, the grid builds its parameters
 * from the same names.
 */
import { z } from 'zod';
import { idListSchema } from './ids.js';

/** Columns the grid sorts by, named as PriceRow's fields (item, season and point sort by name, year and name). */
export const PRICE_SORT_COLUMNS = ['itemId', 'seasonId', 'deliveryPointId', 'price', 'currency', 'source', 'observedOn'] as const;
export type PriceSortColumn = (typeof PRICE_SORT_COLUMNS)[number];

export const TEXT_FILTER_OPS = ['contains', 'notContains', 'equals', 'notEqual', 'startsWith', 'endsWith'] as const;
export type TextFilterOp = (typeof TEXT_FILTER_OPS)[number];
export const NUMBER_FILTER_OPS = ['equals', 'notEqual', 'lessThan', 'lessThanOrEqual', 'greaterThan', 'greaterThanOrEqual', 'inRange'] as const;
export type NumberFilterOp = (typeof NUMBER_FILTER_OPS)[number];

/** Query parameter of each text-filtered column, by the grid's column id. */
export const PRICE_TEXT_FILTERS = { itemId: 'item', seasonId: 'season', deliveryPointId: 'deliveryPoint', source: 'source', currency: 'currency' } as const;
export type PriceTextFilterParam = (typeof PRICE_TEXT_FILTERS)[keyof typeof PRICE_TEXT_FILTERS];

export const MAX_PAGE_ROWS = 1000;
/** Far beyond any co-op's table; keeps the number a plain integer. */
const MAX_OFFSET = 100_000_000;

export interface TextCondition {
  op: TextFilterOp;
  value: string;
}
export interface NumberCondition {
  op: NumberFilterOp;
  value: number;
  /** The upper end of `inRange`. */
  to?: number;
}

const wholeNumber = (name: string, min: number, max: number) =>
  z
    .string({ error: `Send ${name} as a whole number from ${min.toLocaleString('en')} to ${max.toLocaleString('en')}` })
    .regex(/^\d{1,9}$/, `Send ${name} as a whole number from ${min.toLocaleString('en')} to ${max.toLocaleString('en')}`)
    .transform(Number)
    .pipe(z.number().min(min, `Send ${name} as a whole number from ${min.toLocaleString('en')} to ${max.toLocaleString('en')}`).max(max, `Send ${name} as a whole number from ${min.toLocaleString('en')} to ${max.toLocaleString('en')}`));

const textCondition = z
  .string()
  .max(210, 'A text condition may be at most 200 characters')
  .transform((s, ctx): TextCondition => {
    const colon = s.indexOf(':');
    const op = colon < 0 ? '' : s.slice(0, colon);
    if (!(TEXT_FILTER_OPS as readonly string[]).includes(op)) {
      ctx.addIssue({ code: 'custom', message: `Write a text condition as comparison:text, the comparison one of ${TEXT_FILTER_OPS.join(', ')} (e.g. contains:wheat)` });
      return z.NEVER;
    }
    return { op: op as TextFilterOp, value: s.slice(colon + 1) };
  });

const NUMBER = /^-?\d+(\.\d+)?$/;
const numberCondition = z
  .string()
  .max(80, 'A number condition is at most 80 characters')
  .transform((s, ctx): NumberCondition => {
    const [op, a, b, ...rest] = s.split(':');
    const usage = `Write a price condition as comparison:number (decimal point), the comparison one of ${NUMBER_FILTER_OPS.join(', ')} (e.g. greaterThan:200 or inRange:100:250)`;
    if (!(NUMBER_FILTER_OPS as readonly string[]).includes(op) || a === undefined || !NUMBER.test(a) || rest.length) {
      ctx.addIssue({ code: 'custom', message: usage });
      return z.NEVER;
    }
    if (op === 'inRange') {
      if (b === undefined || !NUMBER.test(b)) {
        ctx.addIssue({ code: 'custom', message: `inRange needs two numbers: inRange:from:to (${usage})` });
        return z.NEVER;
      }
      return { op, value: Number(a), to: Number(b) };
    }
    if (b !== undefined) {
      ctx.addIssue({ code: 'custom', message: usage });
      return z.NEVER;
    }
    return { op: op as NumberFilterOp, value: Number(a) };
  });

export const priceQuerySchema = z.object({
  offset: wholeNumber('offset', 0, MAX_OFFSET).default(0),
  limit: wholeNumber('limit', 1, MAX_PAGE_ROWS).default(MAX_PAGE_ROWS),
  sort: z.enum(PRICE_SORT_COLUMNS, { error: `Sort by one of ${PRICE_SORT_COLUMNS.join(', ')}` }).optional(),
  dir: z.enum(['asc', 'desc'], { error: 'Send dir as asc or desc' }).default('asc'),
  items: idListSchema,
  seasons: idListSchema,
  deliveryPoints: idListSchema,
  q: z.string().max(200, 'Search for at most 200 characters').optional(),
  item: textCondition.optional(),
  season: textCondition.optional(),
  deliveryPoint: textCondition.optional(),
  source: textCondition.optional(),
  currency: textCondition.optional(),
  price: numberCondition.optional(),
});
export type PriceQuery = z.output<typeof priceQuerySchema>;
