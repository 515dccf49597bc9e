/** Number words of the budget pages: sensible precision, units beside, a true minus sign. */
import { priceText, quantityText } from '../../../shared/number-format';

const MINUS = '−';
const cache = new Map<string, Intl.NumberFormat>();

function fmt(key: string, make: () => Intl.NumberFormat): Intl.NumberFormat {
  let f = cache.get(key);
  if (!f) {
    f = make();
    cache.set(key, f);
  }
  return f;
}

const fixed = (digits: number) =>
  fmt(`f${digits}`, () => new Intl.NumberFormat('en', { minimumFractionDigits: digits, maximumFractionDigits: digits }));

function clean(s: string): string {
  return s.replace('-', MINUS);
}

const missing = (v: number | null | undefined): v is null | undefined => v == null || !Number.isFinite(v);

/**
 * Nutrient mass (kg or lb): whole units below 10,000 ("9,876"), four significant figures above
 * ("1,423,000" for 1,423,282), as projected tonnages carry no more; exports keep every digit.
 */
export function formatMass(v: number | null | undefined): string {
  if (missing(v)) return '—';
  return Math.abs(v) < 10_000 ? clean(fixed(0).format(v)) : quantityText(v);
}

/** Product mass (t or short tons): one decimal, "217.4"; three below 1. */
export function formatTonnes(v: number | null | undefined, digits = 1): string {
  if (missing(v)) return '—';
  return clean(fixed(Math.abs(v) > 0 && Math.abs(v) < 1 ? 3 : digits).format(v));
}

/** A lot size: as few decimals as it needs, up to two ("25", "27.56" short tons for 25 t). */
export function formatLot(v: number | null | undefined): string {
  if (missing(v)) return '—';
  return clean(fmt('lot', () => new Intl.NumberFormat('en', { maximumFractionDigits: 2 })).format(v));
}

/** A sum of money, whole units: "EUR 95,000". */
export function formatMoney(v: number | null | undefined, currency: string, digits = 0): string {
  if (missing(v)) return '—';
  return `${currency} ${clean(fixed(digits).format(v))}`;
}

/**
 * Money per unit (per t, per kg): two decimals, three below 10: "EUR 475.00", "EUR 1.033". Every
 * price on the budget pages goes through here, with the rule of the outlook pages and e-mails
 * (shared/number-format.ts), so one price reads the same wherever it shows.
 */
export function formatPrice(v: number | null | undefined, currency: string): string {
  if (missing(v)) return '—';
  return `${currency} ${priceText(v)}`;
}

/** A price per unit of an item, the unit named: "EUR 212.10/t", "EUR 1.322/kg N"; no unit, no slash. */
export function formatPricePer(v: number | null | undefined, currency: string, unit: string): string {
  const price = formatPrice(v, currency).trim();
  return unit && !missing(v) ? `${price}/${unit}` : price;
}

/** A percentage; `signed` puts + before rises. */
export function formatPct(v: number | null | undefined, options: { signed?: boolean; digits?: number } = {}): string {
  if (missing(v)) return '—';
  const s = clean(fixed(options.digits ?? 1).format(v));
  return `${options.signed && v > 0 ? '+' : ''}${s} %`;
}

/** An elasticity or other ratio: "−0.34". */
export function formatRatio(v: number | null | undefined): string {
  return missing(v) ? '—' : clean(fixed(2).format(v));
}

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** "2026-08" → "Aug 2026". */
export function formatMonth(month: string): string {
  const m = /^(\d{4})-(\d{2})$/.exec(month);
  if (!m) return month;
  return `${MONTHS[Number(m[2]) - 1] ?? m[2]} ${m[1]}`;
}
