/**
 * Money of a member booking, in integer minor units (cents), computed the same way wherever it is
 * shown; the server's figure is the one charged. Plain data, no Node imports.
 *
 * Rules (docs/bookings.md):
 * - quantities are whole kilograms of product; prices are minor units per tonne;
 * - a line's list value is kg × price / 1000, rounded half up to a whole minor unit;
 * - the list value is the sum of the lines; the early-payment discount is list × discount bp / 10,000,
 *   rounded half up, on the booking as a whole (not per line);
 * - VAT is charged on the discounted net value: net × VAT bp / 10,000, rounded half up;
 * - total = net + VAT.
 */

/** a × b / d rounded half up, for non-negative safe integers (exact: no floating point division). */
export function mulDivRoundHalfUp(a: number, b: number, d: number): number {
  if (!Number.isSafeInteger(a) || !Number.isSafeInteger(b) || !Number.isSafeInteger(d) || a < 0 || b < 0 || d <= 0) throw new RangeError(`mulDivRoundHalfUp needs non-negative integers, got ${a} × ${b} / ${d}`);
  const p = BigInt(a) * BigInt(b);
  const D = BigInt(d);
  const q = p / D;
  const r = p % D;
  const out = r * 2n >= D ? q + 1n : q;
  if (out > BigInt(Number.MAX_SAFE_INTEGER)) throw new RangeError('Amount too large');
  return Number(out);
}

export interface MoneyLine {
  kg: number;
  pricePerTMinor: number;
}

export interface BookingAmounts {
  lines: number[];
  listMinor: number;
  discountBp: number;
  discountMinor: number;
  netMinor: number;
  vatBp: number;
  vatMinor: number;
  totalMinor: number;
}

export function bookingAmounts(lines: MoneyLine[], discountBp: number, vatBp: number): BookingAmounts {
  const lineValues = lines.map((l) => mulDivRoundHalfUp(l.kg, l.pricePerTMinor, 1000));
  const listMinor = lineValues.reduce((a, v) => a + v, 0);
  const discountMinor = mulDivRoundHalfUp(listMinor, discountBp, 10_000);
  const netMinor = listMinor - discountMinor;
  const vatMinor = mulDivRoundHalfUp(netMinor, vatBp, 10_000);
  return { lines: lineValues, listMinor, discountBp, discountMinor, netMinor, vatBp, vatMinor, totalMinor: netMinor + vatMinor };
}

/** 2.5 (%) → 250 basis points; rejects more than two decimals of a per cent. */
export function percentToBp(pct: number): number {
  const bp = Math.round(pct * 100);
  if (Math.abs(bp - pct * 100) > 1e-6) throw new RangeError(`Give a rate with at most two decimals, not ${pct} %`);
  return bp;
}

/** Price per tonne in major units (as budgets store it) → minor units, rounded half up. */
export function toMinor(major: number): number {
  return Math.round(major * 100 + Number.EPSILON * Math.abs(major) * 100);
}

/** 123456 → "1,234.56" (for mails and exports; the screens use their own number format). */
export function formatMinor(minor: number, currency: string): string {
  const sign = minor < 0 ? '−' : '';
  const abs = Math.abs(minor);
  const major = Math.floor(abs / 100).toLocaleString('en-GB');
  return `${sign}${currency} ${major}.${String(abs % 100).padStart(2, '0')}`;
}
