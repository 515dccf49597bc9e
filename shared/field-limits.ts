/**
 * The bounds and formats of what the co-op's data keeps, declared once: the API schemas (data-schemas.ts,
 * contract-schemas.ts, schemas.ts, …), the import row checkers (server/imports/) and the client's
 * forms and grids all take their limits from here, so a form, a file and a request are refused at
 * the same value. Plain data, no Node imports.
 */
import { z } from 'zod';

/** Longest text kept, in characters, for each kind of field. */
export const TEXT_MAX = {
  /** Item and farm codes, and fixed-factor names. */
  code: 40,
  /** Names of items, farms, delivery points, people, models, budgets and products; regions. */
  name: 120,
  /** An item's unit (t, kg, l, h, …). */
  unit: 20,
  /** Where a price or index comes from. */
  source: 200,
  /** A price index's base ("2015 = 100"). */
  indexBase: 60,
  /** A season's label ("2026/27"); the shortest is seasonLabelMin. */
  seasonLabel: 20,
  /** A contract number. */
  contractReference: 40,
  /** A password (the shortest is PASSWORD_MIN_LENGTH in schemas.ts). */
  password: 200,
  /** A fertiliser product's grade source and price note. */
  productNote: 300,
  /** An outlook's title. */
  outlookTitle: 160,
  /** An outlook's commentary. */
  outlookCommentary: 20_000,
  /** A note on an item's expectation. */
  expectationNote: 2000,
} as const;

/** Shortest season label kept ("2026"). */
export const SEASON_LABEL_MIN = 4;

/** First years a season may start in. */
export const SEASON_YEARS = { min: 1900, max: 2200 } as const;

/** Largest numbers kept, each in its field's own unit. */
export const VALUE_MAX = {
  /** A price per unit of the item, in the price's currency. */
  price: 1e9,
  /** A farm's recorded quantity of an item, in the item's unit. */
  quantity: 1e12,
  /** A farm's land in a season, ha. */
  landHa: 1e6,
  /** A farm's level of another fixed factor, in the factor's own unit. */
  factor: 1e9,
  /** What one delivery contract commits, in the item's unit. */
  contractQuantity: 1e7,
  /** A contract's price per unit of the item, in the contract's currency. */
  contractPrice: 1e6,
} as const;

/** Highest VAT rate on fertiliser a booking round takes, %; above it the rate is taken for a slip (common practice, no source). */
export const MAX_VAT_PCT = 50;

/** A month as YYYY-MM (contract windows, booking plans). */
export const MONTH_PATTERN = /^\d{4}-(0[1-9]|1[0-2])$/;

/** A currency as stored: three upper-case letters (ISO 4217 style). */
export const CURRENCY_CODE = /^[A-Z]{3}$/;
export const currencySchema = z.string().trim().regex(CURRENCY_CODE, 'Use a three-letter ISO 4217 code such as EUR');

/** A number as messages write it: 1000000000 → "1,000,000,000", 0.1234567 → "0.123457". */
export const numberInMessage = (n: number) => n.toLocaleString('en-GB', { maximumFractionDigits: 6 });
