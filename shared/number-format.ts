/**
 * How projected quantities and prices are written, on the screens, in the e-mails and in the
 * server's explanations alike. Intl rounds the shortest decimal form of a number half away from
 * zero (1.3215 → 1.322), where toFixed rounds the binary value (1.32149999… → 1.321); one rule in
 * one place keeps every copy of a figure the same. CSV exports carry full values instead.
 */
const nf = (digits: number) => new Intl.NumberFormat('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits });
const whole = nf(0);
const one = nf(1);
const two = nf(2);
const three = nf(3);
const fourFigures = new Intl.NumberFormat('en-GB', { maximumSignificantDigits: 4 });

/** A typographic minus sign in place of the hyphen. */
export const minus = (s: string) => s.replace('-', '−');

/**
 * A projected quantity at the precision its ±2 % bands allow: four significant figures from
 * 10,000 up (1,423,282 kg N → "1,423,000"), whole units from 100 up, one decimal below (18.8).
 */
export function quantityText(v: number): string {
  const abs = Math.abs(v);
  return minus(abs >= 10_000 ? fourFigures.format(v) : abs >= 100 ? whole.format(v) : one.format(v));
}

/** A price: two decimals from 10 up (195.40), three below (1.152), grouped in thousands (1,234.50). */
export function priceText(v: number): string {
  return minus(Math.abs(v) >= 10 ? two.format(v) : three.format(v));
}

const dayFormats = new Map<string, Intl.DateTimeFormat>();
/**
 * A calendar day as the app writes it everywhere, on screens and in e-mails: "3 Dec 2026". The
 * server writes it in UTC (the time zone of its stored timestamps); a page may pass the reader's.
 */
export function dayText(d: Date | string, timeZone = 'UTC'): string {
  let f = dayFormats.get(timeZone);
  if (!f) dayFormats.set(timeZone, (f = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone })));
  return f.format(typeof d === 'string' ? new Date(d) : d);
}
