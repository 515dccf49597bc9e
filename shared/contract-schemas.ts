/**
 * Forward delivery contracts (issue 19) as the API and the screens see them: the body of a save, the
 * row answered, the statuses in words, and the price conversion between the stored minor units and
 * the price per unit people type. Plain data, no Node imports.
 */
import { z } from 'zod';
import { idSchema } from './ids.js';
import { currencySchema, MONTH_PATTERN, numberInMessage, TEXT_MAX, VALUE_MAX } from './field-limits.js';

/** Our own words for where a contract stands. */
export const CONTRACT_STATUSES = ['offered', 'signed', 'delivered', 'cancelled'] as const;
export type ContractStatus = (typeof CONTRACT_STATUSES)[number];
export const CONTRACT_STATUS_LABELS: Record<ContractStatus, string> = {
  offered: 'Offered',
  signed: 'Signed',
  delivered: 'Delivered',
  cancelled: 'Cancelled',
};
/** Contracts that commit output: an offer may still be refused, a cancelled one commits nothing. */
export const BINDING_STATUSES: readonly ContractStatus[] = ['signed', 'delivered'];

/** Minor units per major unit of every currency the co-op uses (EUR, USD, GBP: 100). */
export const MINOR_PER_MAJOR = 100;
/** The stored price (cents) as the price per unit people read: 20550 → 205.5. */
export const priceFromCents = (cents: number): number => cents / MINOR_PER_MAJOR;
/** A typed price as stored: 205.5 → 20550 (rounded to the cent). */
export const priceToCents = (price: number): number => Math.round(price * MINOR_PER_MAJOR);

export { MONTH_PATTERN };
const month = (what: string) => z.string({ error: `Enter the ${what} month as YYYY-MM` }).trim().regex(MONTH_PATTERN, `Enter the ${what} month as YYYY-MM, e.g. 2026-08`);

export const contractSchema = z
  .object({
    reference: z.string({ error: 'Enter the contract number' }).trim().min(1, 'Enter the contract number').max(TEXT_MAX.contractReference, `Use at most ${TEXT_MAX.contractReference} characters`),
    farmId: idSchema,
    seasonId: idSchema,
    itemId: idSchema,
    quantity: z.number({ error: 'Enter the quantity' }).positive('A contract commits more than 0').max(VALUE_MAX.contractQuantity, `At most ${numberInMessage(VALUE_MAX.contractQuantity)} per contract`),
    /** Price per unit of the item in `currency` (major units; stored in cents). */
    price: z
      .number({ error: 'Enter the contract price' })
      .positive('A price must be more than 0')
      .max(VALUE_MAX.contractPrice, `At most ${numberInMessage(VALUE_MAX.contractPrice)} per unit`)
      .refine((p) => Math.abs(priceToCents(p) - p * MINOR_PER_MAJOR) < 1e-6, 'Use at most two decimals (cents)'),
    currency: currencySchema,
    deliveryFrom: month('first delivery'),
    deliveryTo: month('last delivery'),
    status: z.enum(CONTRACT_STATUSES, { error: `Choose a status: ${CONTRACT_STATUSES.join(', ')}` }),
  })
  .refine((c) => c.deliveryFrom <= c.deliveryTo, { message: 'The last delivery month is before the first', path: ['deliveryTo'] });
export type ContractInput = z.infer<typeof contractSchema>;

export interface ContractRow {
  id: number;
  reference: string;
  farmId: number;
  farmCode: string;
  farmName: string;
  seasonId: number;
  season: string;
  itemId: number;
  itemCode: string;
  itemName: string;
  unit: string;
  quantity: number;
  /** Per unit of the item, major units of `currency` (stored as cents). */
  price: number;
  currency: string;
  deliveryFrom: string;
  deliveryTo: string;
  status: ContractStatus;
  /** Raised by every change; PUT sends it back and a stale one is refused (409 `stale`). */
  version: number;
}
