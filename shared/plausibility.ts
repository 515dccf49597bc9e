/**
 * Whether a price is plausible against the item's own recent history. A typed or imported price far
 * from what the item usually costs is far more often a slip (a decimal mark misplaced, a per-tonne
 * price entered for a per-kilogram item) than a market move, so it is asked about before it is
 * stored. The bounds (3× and ⅓ of the recent median) are common practice, no source: a genuine
 * season-to-season move of a farm price beyond them is rare, and a factor of 10 or 1000 is the
 * typical signature of a slip.
 */

/** What an item's prices have been around a season: a median and how many prices it is taken over. */
export interface PriceHistory {
  median: number;
  count: number;
}

/** One item's prices season by season (`priceHistories` in server/prices/prices-repository.ts), oldest first. */
export type SeasonPrices = readonly { startYear: number; median: number; count: number }[];

/** Seasons that make an item's history around a season. */
export const HISTORY_SEASONS = 3;

/**
 * The item's history as it stood at the season starting in `year`: its HISTORY_SEASONS latest
 * seasons with prices up to and including that one (the median of their medians, over all their
 * prices), or, for a season before any price, its first HISTORY_SEASONS seasons. So a price of
 * 2006 is judged against 2004–2006, not against today's prices.
 */
export function historyAt(seasons: SeasonPrices | undefined, year: number): PriceHistory | null {
  if (!seasons?.length) return null;
  const upTo = seasons.filter((s) => s.startYear <= year);
  const window = upTo.length ? upTo.slice(-HISTORY_SEASONS) : seasons.slice(0, HISTORY_SEASONS);
  const medians = window.map((s) => s.median).sort((a, b) => a - b);
  const mid = medians.length >> 1;
  const median = medians.length % 2 ? medians[mid] : (medians[mid - 1] + medians[mid]) / 2;
  return { median, count: window.reduce((n, s) => n + s.count, 0) };
}

/** Fewest stored prices before a median is trusted to judge a new one. */
export const MIN_HISTORY = 3;
/** A price above FACTOR × median or below median ÷ FACTOR asks for confirmation. */
export const PLAUSIBLE_FACTOR = 3;

/** The body flag that confirms implausible values on the API's price writes. */
export const CONFIRM_FLAG = 'confirmImplausible';

export interface PriceItemRef {
  name: string;
  unit: string;
}

const fmt = (v: number) => (Math.abs(v) >= 10 ? v.toLocaleString('en-GB', { maximumFractionDigits: 2 }) : v.toLocaleString('en-GB', { maximumSignificantDigits: 4 }));

/**
 * Null when `price` is plausible (or there is too little history to judge), else a sentence that
 * names the price, the median it was compared with and the likely slip.
 */
export function implausiblePrice(price: number, item: PriceItemRef, currency: string, history: PriceHistory | undefined | null): string | null {
  if (!history || history.count < MIN_HISTORY || !(history.median > 0) || !(price > 0)) return null;
  const ratio = price / history.median;
  if (ratio <= PLAUSIBLE_FACTOR && ratio >= 1 / PLAUSIBLE_FACTOR) return null;
  const per = `${currency}/${item.unit}`;
  const times = (x: number) => x.toLocaleString('en-GB', { maximumSignificantDigits: 2 });
  const base = `${fmt(price)} ${per} is ${ratio > 1 ? `about ${times(ratio)} times` : `about 1/${times(1 / ratio)} of`} ${item.name}'s recent median of ${fmt(history.median)} ${per} (over ${history.count} prices)`;
  const hint = slipHint(ratio, item.unit);
  return `${base}${hint ? `; ${hint}` : ''}`;
}

/** The slip a ratio near a power of ten points at. */
function slipHint(ratio: number, unit: string): string | null {
  const near = (target: number) => ratio / target > 0.5 && ratio / target < 2;
  const perKg = /^kg\b/i.test(unit.trim());
  const perT = /^t$/i.test(unit.trim());
  if (near(1000) && perKg) return `is it a price per tonne entered per ${unit}?`;
  if (near(1 / 1000) && perT) return 'is it a price per kg entered per tonne?';
  for (const f of [10, 100, 1000]) {
    if (near(f) || near(1 / f)) return 'is the decimal mark in the right place?';
  }
  return null;
}

// --- farm records ---------------------------------------------------------------------------------

/** What a farm has recorded of an item per hectare of its land, over its own seasons. */
export interface QuantityHistory {
  /** Median of quantity ÷ land (ha) over the seasons with both. */
  perHa: number;
  /** Seasons it is taken over. */
  seasons: number;
}

/** The farm's history of an item from its seasons' quantities and land (seasons without land, or with 0 ha, left out). */
export function quantityHistory(points: readonly { quantity: number; landHa: number | null | undefined }[]): QuantityHistory | null {
  const perHa = points.filter((p) => p.landHa && p.landHa > 0 && Number.isFinite(p.quantity)).map((p) => p.quantity / p.landHa!);
  if (perHa.length === 0) return null;
  perHa.sort((a, b) => a - b);
  const mid = perHa.length >> 1;
  return { perHa: perHa.length % 2 ? perHa[mid] : (perHa[mid - 1] + perHa[mid]) / 2, seasons: perHa.length };
}

/**
 * Null when a farm's quantity of an item is plausible against the farm's own history per hectare
 * (or there is too little history, no land for the season, or the quantity is 0: a farm may skip a
 * crop), else a sentence naming the quantity, the farm's usual rate and the likely slip. The same
 * bounds as for prices (PLAUSIBLE_FACTOR, at least MIN_HISTORY seasons): a farm's own yield or input
 * rate per hectare seldom moves threefold from one season to the next (common practice, no source).
 */
export function implausibleQuantity(quantity: number, landHa: number | null | undefined, item: PriceItemRef, farmCode: string, history: QuantityHistory | null | undefined): string | null {
  if (!history || history.seasons < MIN_HISTORY || !(history.perHa > 0) || !(quantity > 0) || !landHa || !(landHa > 0)) return null;
  const perHa = quantity / landHa;
  const ratio = perHa / history.perHa;
  if (ratio <= PLAUSIBLE_FACTOR && ratio >= 1 / PLAUSIBLE_FACTOR) return null;
  const times = (x: number) => x.toLocaleString('en-GB', { maximumSignificantDigits: 2 });
  const base =
    `${fmt(quantity)} ${item.unit} of ${item.name.toLowerCase()} on ${fmt(landHa)} ha is ${fmt(perHa)} ${item.unit}/ha, ` +
    `${ratio > 1 ? `about ${times(ratio)} times` : `about 1/${times(1 / ratio)} of`} ${farmCode}'s usual ${fmt(history.perHa)} ${item.unit}/ha (median of ${history.seasons} seasons)`;
  const hint = slipHint(ratio, item.unit);
  return `${base}${hint ? `; ${hint}` : ''}`;
}
