/**
 * The treasurer's and the planner's views of member bookings: bookings against the round's budget per
 * product and delivery month, cash received against the budget's cash plan (and the plan with real
 * prepayments in it), and booked nutrients against each farm's projection. Figures are computed here;
 * the screens only format them.
 */
import { DateTime } from 'luxon';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { toCsv, toXlsx, type SheetColumn } from '../exports/spreadsheet-writers.js';
import { mulDivRoundHalfUp } from '../../shared/booking-money.js';
import type { BookingCashMonth, BookingLine, BookingReport, BookingReportRow, FarmNutrientRow, NutrientComparison } from '../../shared/booking-types.js';
import { NUTRIENTS, type NutrientAmounts } from '../budget/nutrients.js';
import { allFarmIds, farmsByCode, listRounds, paymentsOf, roundBookings, roundWithNames } from './bookings-repository.js';
import { BOOKING_CAUTIONS, bookingView, budgetFacts, projectedNeeds, roundView, sumNutrients } from './bookings-service.js';

const today = () => DateTime.utc().toISODate()!;

export async function roundsList(db: Db) {
  return (await listRounds(db)).map((r) => roundView(r, today()));
}

async function round(db: Db, roundId: number) {
  const r = await roundWithNames(db, roundId);
  if (!r) throw AppError.notFound('The booking round');
  return r;
}

export async function roundBookingList(db: Db, roundId: number) {
  const r = await round(db, roundId);
  const rows = await roundBookings(db, roundId);
  const payments = await paymentsOf(
    db,
    rows.map((x) => x.booking.id),
  );
  return rows.map((x) => ({ ...bookingView(x.booking, payments, x.farmName, r, today()), farmCode: x.farmCode }));
}

/** Splits `amount` over lines in proportion to their list values (largest remainder, so the parts add up exactly). */
export function allocate(amount: number, weights: number[]): number[] {
  const total = weights.reduce((a, w) => a + w, 0);
  if (total <= 0) return weights.map(() => 0);
  const base = weights.map((w) => mulDivRoundHalfUp(w, amount, total));
  let diff = amount - base.reduce((a, v) => a + v, 0);
  for (let i = 0; diff !== 0 && i < base.length * 2; i++) {
    const j = i % base.length;
    if (weights[j]! > 0) {
      const step = diff > 0 ? 1 : -1;
      if (base[j]! + step >= 0) {
        base[j]! += step;
        diff -= step;
      }
    }
  }
  return base;
}

export async function bookingReport(db: Db, roundId: number): Promise<BookingReport> {
  const r = await round(db, roundId);
  const facts = await budgetFacts(db, r.round.budgetId);
  const rows = await roundBookings(db, roundId);
  const payments = await paymentsOf(
    db,
    rows.map((x) => x.booking.id),
  );
  const active = rows.filter((x) => x.booking.status !== 'cancelled').map((x) => x.booking);
  type Acc = { bookedKg: number; net: number; prepaid: number; outstanding: number };
  const byProduct = new Map<number, Acc>();
  const byProductMonth = new Map<string, Acc & { productId: number; month: string }>();
  const acc = (): Acc => ({ bookedKg: 0, net: 0, prepaid: 0, outstanding: 0 });
  let prepaidTotal = 0;
  let outstandingTotal = 0;
  for (const b of active) {
    const lines = b.lines as BookingLine[];
    const weights = lines.map((l) => l.listMinor);
    const net = allocate(b.netMinor, weights);
    const paid = payments.filter((p) => p.bookingId === b.id && p.state === 'paid').reduce((a, p) => a + p.amountMinor, 0);
    const prepaid = allocate(paid, weights);
    const outstanding = allocate(Math.max(b.totalMinor - paid, 0), weights);
    prepaidTotal += paid;
    outstandingTotal += Math.max(b.totalMinor - paid, 0);
    lines.forEach((l, i) => {
      const p = byProduct.get(l.productId) ?? acc();
      const key = `${l.productId}|${b.deliveryMonth}`;
      const pm = byProductMonth.get(key) ?? { ...acc(), productId: l.productId, month: b.deliveryMonth };
      for (const t of [p, pm]) {
        t.bookedKg += l.kg;
        t.net += net[i]!;
        t.prepaid += prepaid[i]!;
        t.outstanding += outstanding[i]!;
      }
      byProduct.set(l.productId, p);
      byProductMonth.set(key, pm);
    });
  }
  const out: BookingReportRow[] = [];
  for (const prod of facts.products) {
    const a = byProduct.get(prod.productId) ?? acc();
    const budgetT = facts.budgetT.get(prod.productId) ?? 0;
    out.push({
      productId: prod.productId,
      name: prod.name,
      deliveryMonth: null,
      bookedT: a.bookedKg / 1000,
      bookedNetMinor: a.net,
      prepaidMinor: a.prepaid,
      outstandingMinor: a.outstanding,
      notYetBookedT: Math.max(budgetT - a.bookedKg / 1000, 0),
      budgetT,
    });
    for (const pm of [...byProductMonth.values()].filter((x) => x.productId === prod.productId).sort((x, y) => (x.month < y.month ? -1 : 1)))
      out.push({ productId: prod.productId, name: prod.name, deliveryMonth: pm.month, bookedT: pm.bookedKg / 1000, bookedNetMinor: pm.net, prepaidMinor: pm.prepaid, outstandingMinor: pm.outstanding, notYetBookedT: null, budgetT: null });
  }
  // Cash: the plan (base scenario of the budget), prepayments received per month (refunds taken off in
  // the month they were made), and the plan with the real prepayments in it.
  const received = new Map<string, number>();
  let refunded = 0;
  for (const p of payments) {
    if (p.paidAt && (p.state === 'paid' || p.state === 'refunded')) received.set(p.paidAt.toISOString().slice(0, 7), (received.get(p.paidAt.toISOString().slice(0, 7)) ?? 0) + p.amountMinor);
    if (p.refundedAt && p.state === 'refunded') {
      const m = p.refundedAt.toISOString().slice(0, 7);
      received.set(m, (received.get(m) ?? 0) - p.amountMinor);
      refunded += p.amountMinor;
    }
  }
  const budgetTotalT = [...facts.budgetT.values()].reduce((a, t) => a + t, 0);
  const bookedT = active.reduce((a, b) => a + (b.lines as BookingLine[]).reduce((s, l) => s + l.kg, 0), 0) / 1000;
  const bookedShare = budgetTotalT > 0 ? Math.min(bookedT / budgetTotalT, 1) : 0;
  const dueAtDelivery = new Map<string, number>();
  for (const b of active) {
    const paid = payments.filter((p) => p.bookingId === b.id && p.state === 'paid').reduce((a, p) => a + p.amountMinor, 0);
    if (b.totalMinor > paid) dueAtDelivery.set(b.deliveryMonth, (dueAtDelivery.get(b.deliveryMonth) ?? 0) + b.totalMinor - paid);
  }
  const months = new Set([...facts.cash.map((c) => c.month), ...received.keys(), ...dueAtDelivery.keys()]);
  const cash: BookingCashMonth[] = [...months].sort().map((month) => {
    const planned = facts.cash.find((c) => c.month === month)?.minor ?? 0;
    const got = received.get(month) ?? 0;
    return { month, plannedMinor: planned, receivedMinor: got, expectedMinor: got + Math.round(planned * (1 - bookedShare)) + (dueAtDelivery.get(month) ?? 0) };
  });
  const allFarms = await allFarmIds(db);
  return {
    round: roundView(r, today()),
    rows: out,
    totals: {
      bookedT,
      bookedNetMinor: active.reduce((a, b) => a + b.netMinor, 0),
      prepaidMinor: prepaidTotal,
      outstandingMinor: outstandingTotal,
      refundedMinor: refunded,
      bookings: active.length,
      farmsBooked: new Set(active.map((b) => b.farmId)).size,
      farms: allFarms.length,
    },
    cash,
    notes: [
      'Booked and prepaid figures count bookings not cancelled. Prepaid and outstanding amounts include VAT; booked net value is after the early-payment discount, before VAT.',
      `Expected cash = prepayments received + the budget’s planned cash for the share not yet booked (${Math.round(bookedShare * 100)} % of the budgeted tonnes are booked) + unpaid bookings in their delivery month.`,
      'Budget figures come from the base scenario of the round’s budget; cash amounts there are converted to minor units.',
    ],
  };
}

const REPORT_COLUMNS: SheetColumn[] = [
  { key: 'name', header: 'product', width: 24 },
  { key: 'deliveryMonth', header: 'delivery_month', width: 14 },
  { key: 'budgetT', header: 'budget_t', type: 'number' },
  { key: 'bookedT', header: 'booked_t', type: 'number' },
  { key: 'notYetBookedT', header: 'not_yet_booked_t', type: 'number' },
  { key: 'bookedNet', header: 'booked_net', type: 'number' },
  { key: 'prepaid', header: 'prepaid', type: 'number' },
  { key: 'outstanding', header: 'outstanding', type: 'number' },
  { key: 'currency', header: 'currency' },
];

export async function bookingReportExport(db: Db, roundId: number, format: 'csv' | 'xlsx') {
  const report = await bookingReport(db, roundId);
  const major = (m: number) => m / 100;
  const rows = report.rows.map((r) => ({
    name: r.name,
    deliveryMonth: r.deliveryMonth ?? 'all',
    budgetT: r.budgetT,
    bookedT: r.bookedT,
    notYetBookedT: r.notYetBookedT,
    bookedNet: major(r.bookedNetMinor),
    prepaid: major(r.prepaidMinor),
    outstanding: major(r.outstandingMinor),
    currency: report.round.currency,
  }));
  const base = `bookings-${report.round.season.replace(/[^0-9A-Za-z]+/g, '-')}`;
  if (format === 'xlsx') return { name: `${base}.xlsx`, type: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', body: await toXlsx(rows, REPORT_COLUMNS, 'Bookings') };
  return { name: `${base}.csv`, type: 'text/csv; charset=utf-8', body: toCsv(rows, REPORT_COLUMNS) };
}

/** Booked at most this share of a projected nutrient: "far below" (our threshold, common practice, no source). */
export const FAR_BELOW = 0.5;
/** Booked at least this multiple: "far above" (our threshold, common practice, no source). */
export const FAR_ABOVE = 1.5;

const WORD = { nitrogen: 'nitrogen', phosphate: 'phosphate', potash: 'potash' } as const;

export async function nutrientComparison(db: Db, roundId: number): Promise<NutrientComparison> {
  const r = await round(db, roundId);
  const needs = await projectedNeeds(db, r.round.seasonId);
  const rows = (await roundBookings(db, roundId)).filter((x) => x.booking.status !== 'cancelled');
  const allFarms = await farmsByCode(db);
  const zero = (): NutrientAmounts => ({ nitrogen: 0, phosphate: 0, potash: 0 });
  const coop = { projected: zero(), booked: zero() };
  const out: FarmNutrientRow[] = allFarms.map((f) => {
    const mine = rows.filter((x) => x.booking.farmId === f.id);
    const booked = sumNutrients(mine.flatMap((x) => x.booking.lines as BookingLine[]));
    const projected = needs?.needs.get(f.id) ?? null;
    const ratio = { nitrogen: null, phosphate: null, potash: null } as FarmNutrientRow['ratio'];
    for (const n of NUTRIENTS) {
      coop.booked[n] += booked[n];
      if (projected) {
        coop.projected[n] += projected[n];
        ratio[n] = projected[n] > 0 ? booked[n] / projected[n] : null;
      }
    }
    let flag: FarmNutrientRow['flag'] = 'in-line';
    let words = 'Booked in line with its projection.';
    if (!projected) {
      flag = 'no-projection';
      words = mine.length ? 'Booked; no published projection to compare with.' : 'No booking and no published projection.';
    } else if (!mine.length) {
      flag = 'none';
      words = 'Has not booked yet.';
    } else {
      const low = NUTRIENTS.filter((n) => ratio[n] !== null && ratio[n]! < FAR_BELOW);
      const high = NUTRIENTS.filter((n) => ratio[n] !== null && ratio[n]! > FAR_ABOVE);
      const pct = (n: (typeof NUTRIENTS)[number]) => `${Math.round(ratio[n]! * 100)} % of its projected ${WORD[n]}`;
      if (low.length) {
        flag = 'below';
        words = `Far below its projection: booked ${low.map(pct).join(', ')}.`;
      } else if (high.length) {
        flag = 'above';
        words = `Far above its projection: booked ${high.map(pct).join(', ')}.`;
      }
    }
    return { farmId: f.id, code: f.code, name: f.name, landHa: f.landHa, projected, booked, ratio, flag, words };
  });
  return {
    round: roundView(r, today()),
    farms: out,
    coop,
    source: needs?.source ?? 'No published outlook for this season: projections are missing.',
    cautions: [...BOOKING_CAUTIONS.slice(0, 2), `Far below means less than ${FAR_BELOW * 100} % of a projected nutrient booked; far above, more than ${FAR_ABOVE * 100} % (thresholds of our own, no source). A farm may buy elsewhere, carry stock or change its cropping.`],
  };
}
