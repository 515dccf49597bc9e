import type { PriceRow } from '../../../../shared/api-types';
import { priceSchema, type PriceInput } from '../../../../shared/data-schemas';
import { PRICE_COLUMN_LABEL } from '../../../../shared/price-columns';

/** The price fields a planner edits in the grid. */
export type PriceField = keyof PriceInput;

export const PRICE_FIELD_LABEL: Record<PriceField, string> = {
  itemId: PRICE_COLUMN_LABEL.item,
  seasonId: PRICE_COLUMN_LABEL.season,
  deliveryPointId: PRICE_COLUMN_LABEL.delivery_point,
  price: PRICE_COLUMN_LABEL.price,
  currency: PRICE_COLUMN_LABEL.currency,
  source: PRICE_COLUMN_LABEL.source,
  observedOn: PRICE_COLUMN_LABEL.observed_on,
};

/** The body of PUT /api/prices/:id for `row` with one field changed. */
export function withEdit(row: PriceRow, field: PriceField, value: unknown): PriceInput {
  const body: Record<PriceField, unknown> = {
    itemId: row.itemId,
    seasonId: row.seasonId,
    deliveryPointId: row.deliveryPointId,
    price: row.price,
    currency: row.currency,
    source: row.source,
    observedOn: row.observedOn,
  };
  body[field] = typeof value === 'string' ? value.trim() : value;
  if (field === 'currency' && typeof body.currency === 'string') body.currency = body.currency.toUpperCase();
  return body as PriceInput;
}

/**
 * What is wrong with changing `field` of `row` to `value`, in the words of the shared schema the
 * server checks with, or null when the edit may be saved. `others` are the rows loaded in the grid:
 * an edit that would give two prices the same item, season, delivery point and date is refused here
 * rather than by the database.
 */
export function priceEditProblems(row: PriceRow, field: PriceField, value: unknown, others: readonly PriceRow[] = []): string[] | null {
  if (value === null || value === undefined || (typeof value === 'number' && Number.isNaN(value)) || (typeof value === 'string' && value.trim() === '')) {
    return [`${PRICE_FIELD_LABEL[field]} is required`];
  }
  const body = withEdit(row, field, value);
  const checked = priceSchema.safeParse(body);
  if (!checked.success) {
    const mine = checked.error.issues.filter((issue) => issue.path[0] === field);
    return (mine.length ? mine : checked.error.issues).map((issue) => issue.message);
  }
  if (field === 'itemId' || field === 'seasonId' || field === 'deliveryPointId' || field === 'observedOn') {
    const twin = others.find(
      (o) =>
        o.id !== row.id &&
        o.itemId === body.itemId &&
        o.seasonId === body.seasonId &&
        o.deliveryPointId === body.deliveryPointId &&
        o.observedOn === body.observedOn,
    );
    if (twin) {
      return [`${twin.itemName} at ${twin.deliveryPoint} on ${twin.observedOn} (${twin.season}) is already priced at ${twin.price} ${twin.currency}; change that row instead`];
    }
  }
  return null;
}
