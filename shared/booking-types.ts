/**
 * Member bookings (a member's real order of the season's fertiliser, with its prepayment): request
 * schemas and answer shapes shared by the API (server/bookings) and the screens. Not the budget's
 * *booking plan* (shared/budget-types.ts BookingPlan: the treasurer's planned monthly shares).
 */
import { z } from 'zod';
import { idSchema } from './ids.js';
import { seasonLabelSchema } from './outlook-schemas.js';
import { MAX_VAT_PCT, MONTH_PATTERN } from './field-limits.js';
import type { NutrientAmounts } from './budget-types.js';
import type { BookingAmounts } from './booking-money.js';

const month = z.string().regex(MONTH_PATTERN, 'Use YYYY-MM, e.g. 2027-02');
const day = z.string().regex(/^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, 'Use YYYY-MM-DD, e.g. 2027-01-31');

/** Most a line may carry: 5,000 t of one product (a bound on slips, not on farms). */
export const MAX_LINE_TONNES = 5000;
/** A booking above this multiple of the farm's projected need of a nutrient asks for confirmation. */
export const LARGE_BOOKING_FACTOR = 3;

/** The treasurer opens (or changes) a season's booking round. */
export const bookingRoundSchema = z.strictObject({
  season: seasonLabelSchema,
  budgetId: idSchema,
  discountDeadline: day,
  /** % of the net value; default: the budget's booking plan prepayment discount. */
  discountPct: z.number().min(0, 'A discount cannot be negative').max(50, 'A discount above 50 % is not plausible').optional(),
  /** VAT on fertiliser, % (a setting: rates differ by country and change). */
  vatPct: z.number().min(0, 'VAT cannot be negative').max(MAX_VAT_PCT, `A VAT rate above ${MAX_VAT_PCT} % is not plausible`),
});
export type BookingRoundInput = z.output<typeof bookingRoundSchema>;

export const bookingLineInputSchema = z.strictObject({
  productId: idSchema,
  /** Tonnes of product, to the kilogram. */
  tonnes: z
    .number({ error: 'Give tonnes of product as a number' })
    .positive('Book more than 0 t, or leave the product out')
    .max(MAX_LINE_TONNES, `At most ${MAX_LINE_TONNES} t of one product; call the co-op for more`)
    .refine((t) => Math.abs(Math.round(t * 1000) - t * 1000) < 1e-6, 'Give tonnes to at most three decimals (the kilogram)'),
});

export const bookingInputSchema = z.strictObject({
  lines: z.array(bookingLineInputSchema).min(1, 'Book at least one product').max(30),
  deliveryMonth: month,
  /** Quantities far above the projected need were seen and meant. */
  confirmLarge: z.boolean().optional(),
  /** When changing: the version the member saw (a change made meanwhile answers 409 stale). */
  version: z.number().int().min(1).optional(),
});
export type BookingInput = z.output<typeof bookingInputSchema>;

export type BookingStatus = 'placed' | 'prepaid' | 'cancelled';
export type PaymentState = 'pending' | 'paid' | 'failed' | 'refunded';

export interface BookingLine {
  productId: number;
  name: string;
  grade: string;
  kg: number;
  pricePerTMinor: number;
  listMinor: number;
  /** kg of N, P2O5, K2O the line brings. */
  nutrients: NutrientAmounts;
}

export interface BookingPaymentView {
  id: number;
  state: PaymentState;
  amountMinor: number;
  currency: string;
  checkoutUrl: string | null;
  createdAt: string;
  paidAt: string | null;
  refundedAt: string | null;
}

/** A booking as the API shows it; the money fields are those of BookingAmounts (shared/booking-money.ts). */
export interface BookingView extends Omit<BookingAmounts, 'lines'> {
  id: number;
  roundId: number;
  farmId: number;
  farmName: string;
  season: string;
  status: BookingStatus;
  version: number;
  deliveryMonth: string;
  currency: string;
  lines: BookingLine[];
  nutrients: NutrientAmounts;
  /** Before the deadline: the member may change (unpaid) or cancel (refund when prepaid). */
  changeable: boolean;
  payments: BookingPaymentView[];
  createdAt: string;
  updatedAt: string;
}

export interface BookingProduct {
  productId: number;
  name: string;
  grade: string;
  nPct: number;
  p2o5Pct: number;
  k2oPct: number;
  pricePerTMinor: number;
  lotT: number;
}

export interface BookingRoundView {
  id: number;
  season: string;
  budgetId: number;
  budgetName: string;
  discountDeadline: string;
  discountBp: number;
  vatBp: number;
  currency: string;
  /** Today is on or before the deadline: the discount applies and bookings may change. */
  beforeDeadline: boolean;
}

export interface BookingOffer {
  round: BookingRoundView;
  farm: { id: number; name: string; landHa: number };
  products: BookingProduct[];
  deliveryMonths: string[];
  /** The delivery month of the budget's booking plan: the form's first choice. */
  planDeliveryMonth: string;
  /** The farm's projected need (published outlook, base scenario), or null when there is none. */
  need: { nutrients: NutrientAmounts; source: string } | null;
  /** Suggested tonnes per product covering the need (least-cost mix of the booking prices), or empty. */
  suggestion: { productId: number; tonnes: number }[];
  cautions: string[];
  booking: BookingView | null;
}

export interface CheckoutStart {
  paymentId: number;
  url: string;
}

/** One product × delivery month of a round, in the treasurer's view. */
export interface BookingReportRow {
  productId: number;
  name: string;
  deliveryMonth: string | null;
  bookedT: number;
  bookedNetMinor: number;
  prepaidMinor: number;
  outstandingMinor: number;
  /** Budgeted tonnes not yet booked (per product; null on month rows). */
  notYetBookedT: number | null;
  budgetT: number | null;
}

export interface BookingCashMonth {
  month: string;
  /** The budget's cash plan (base scenario), minor units. */
  plannedMinor: number;
  /** Prepayments received this month. */
  receivedMinor: number;
  /** The plan with real prepayments where they exist: received, plus the plan's share still to book. */
  expectedMinor: number;
}

export interface BookingReport {
  round: BookingRoundView;
  rows: BookingReportRow[];
  totals: { bookedT: number; bookedNetMinor: number; prepaidMinor: number; outstandingMinor: number; refundedMinor: number; bookings: number; farmsBooked: number; farms: number };
  cash: BookingCashMonth[];
  notes: string[];
}

export interface FarmNutrientRow {
  farmId: number;
  code: string;
  name: string;
  landHa: number;
  projected: NutrientAmounts | null;
  booked: NutrientAmounts;
  /** booked ÷ projected per nutrient, null without a projection or with a zero projection. */
  ratio: Record<keyof NutrientAmounts, number | null>;
  flag: 'below' | 'above' | 'none' | 'in-line' | 'no-projection';
  words: string;
}

export interface NutrientComparison {
  round: BookingRoundView;
  farms: FarmNutrientRow[];
  coop: { projected: NutrientAmounts; booked: NutrientAmounts };
  source: string;
  cautions: string[];
}
