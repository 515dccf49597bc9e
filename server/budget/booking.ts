/**
 * Booking schedule and cash: a share of every product's tonnage is booked each month; a booked
 * tranche is either prepaid in its booking month at the prepayment discount, or invoiced on the
 * first day of the delivery month and paid `paymentTermsDays` calendar days later. Cash is counted
 * in the calendar month a payment falls in. With a financing rate, each prepaid tranche also shows
 * the interest cost of paying early (simple interest, actual/365, from the first day of the booking
 * month to the day the invoice would have been due) against its discount.
 */
import { DateTime } from 'luxon';
import type { BookingMonth, BookingPlan, CashMonth, CashSchedule, Tranche } from '../../shared/budget-types.js';
import { BudgetInputError } from './nutrients.js';
import { MONTH_PATTERN as MONTH } from '../../shared/field-limits.js';

export type { BookingMonth, BookingPlan, CashMonth, CashSchedule, Tranche } from '../../shared/budget-types.js';

export interface CashLine {
  productId: number;
  name: string;
  tonnes: number;
  pricePerT: number;
}


function monthStart(month: string): DateTime {
  return DateTime.fromFormat(month, 'yyyy-MM', { zone: 'utc' });
}

/** Checks the plan's internal consistency; each problem names its field. */
export function checkBookingPlan(plan: BookingPlan): void {
  if (plan.months.length === 0) throw new BudgetInputError('Book at least one month', 'bookingPlan.months');
  plan.months.forEach((m, i) => {
    if (!MONTH.test(m.month)) throw new BudgetInputError(`Use YYYY-MM, got "${m.month}"`, `bookingPlan.months.${i}.month`);
    if (i > 0 && m.month <= plan.months[i - 1]!.month) throw new BudgetInputError('List the booking months once each, in order', `bookingPlan.months.${i}.month`);
  });
  const sum = plan.months.reduce((a, m) => a + m.share, 0);
  if (Math.abs(sum - 1) > 1e-6) throw new BudgetInputError(`The booked shares must add up to 1 (100 %); they add up to ${+(sum * 100).toFixed(4)} %`, 'bookingPlan.months');
  if (!MONTH.test(plan.deliveryMonth)) throw new BudgetInputError(`Use YYYY-MM, got "${plan.deliveryMonth}"`, 'bookingPlan.deliveryMonth');
  const last = plan.months[plan.months.length - 1]!.month;
  if (plan.deliveryMonth < last) throw new BudgetInputError(`Delivery (${plan.deliveryMonth}) cannot come before the last booking month (${last})`, 'bookingPlan.deliveryMonth');
}

/** Tranches, monthly cash from the first booking month to the last payment, and totals. */
export function cashSchedule(lines: CashLine[], plan: BookingPlan): CashSchedule {
  checkBookingPlan(plan);
  const d = plan.prepayDiscountPct / 100;
  const due = monthStart(plan.deliveryMonth).plus({ days: plan.paymentTermsDays });
  const tranches: Tranche[] = [];
  for (const m of plan.months)
    for (const l of lines) {
      if (l.tonnes <= 0) continue;
      const tonnes = l.tonnes * m.share;
      const listValue = tonnes * l.pricePerT;
      const discount = m.prepay ? listValue * d : 0;
      const paid = listValue - discount;
      const payDate = m.prepay ? monthStart(m.month) : due;
      const days = due.diff(monthStart(m.month), 'days').days;
      tranches.push({
        bookingMonth: m.month,
        productId: l.productId,
        name: l.name,
        tonnes,
        listValue,
        prepay: m.prepay,
        discount,
        paid,
        payDate: payDate.toISODate()!,
        payMonth: payDate.toFormat('yyyy-MM'),
        financingCost: m.prepay && plan.financingRatePct !== null ? (paid * plan.financingRatePct * Math.max(days, 0)) / 100 / 365 : null,
      });
    }
  const first = plan.months[0]!.month;
  const lastPay = tranches.reduce((a, t) => (t.payMonth > a ? t.payMonth : a), plan.months[plan.months.length - 1]!.month);
  const months: CashMonth[] = [];
  let cumulative = 0;
  for (let m = monthStart(first); m.toFormat('yyyy-MM') <= lastPay; m = m.plus({ months: 1 })) {
    const key = m.toFormat('yyyy-MM');
    const booked = tranches.filter((t) => t.bookingMonth === key);
    const paying = tranches.filter((t) => t.payMonth === key);
    const prepaid = paying.filter((t) => t.prepay).reduce((a, t) => a + t.paid, 0);
    const onTerms = paying.filter((t) => !t.prepay).reduce((a, t) => a + t.paid, 0);
    cumulative += prepaid + onTerms;
    months.push({
      month: key,
      bookedTonnes: booked.reduce((a, t) => a + t.tonnes, 0),
      bookedValue: booked.reduce((a, t) => a + t.listValue, 0),
      prepaid,
      onTerms,
      cash: prepaid + onTerms,
      cumulative,
    });
  }
  const prepaidTranches = tranches.filter((t) => t.prepay);
  const financingCost = plan.financingRatePct === null ? null : prepaidTranches.reduce((a, t) => a + (t.financingCost ?? 0), 0);
  const prepayDiscount = tranches.reduce((a, t) => a + t.discount, 0);
  const peak = months.reduce<CashMonth | null>((a, m) => (m.cash > (a?.cash ?? 0) ? m : a), null);
  return {
    months,
    tranches,
    totals: {
      listValue: tranches.reduce((a, t) => a + t.listValue, 0),
      prepayDiscount,
      cash: tranches.reduce((a, t) => a + t.paid, 0),
      financingCost,
      netPrepaySaving: financingCost === null ? null : prepayDiscount - financingCost,
      peakMonth: peak?.month ?? null,
      peakCash: peak?.cash ?? 0,
    },
  };
}
