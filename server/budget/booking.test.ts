import { describe, expect, it } from 'vitest';
import { cashSchedule, type BookingPlan } from './booking.js';
import { BudgetInputError } from './nutrients.js';

const plan: BookingPlan = {
  months: [
    { month: '2026-08', share: 0.5, prepay: true },
    { month: '2026-10', share: 0.3, prepay: true },
    { month: '2026-12', share: 0.2, prepay: false },
  ],
  prepayDiscountPct: 3,
  paymentTermsDays: 30,
  deliveryMonth: '2027-02',
  financingRatePct: 6,
};
const lines = [{ productId: 1, name: 'Urea', tonnes: 200, pricePerT: 500 }];

describe('booking and cash schedule', () => {
  it('books shares of the tonnage, pays prepaid tranches at booking and the rest on terms after delivery', () => {
    // Hand-computed: 200 t × 500 = 100 000. Aug 50 % prepaid: 50 000 − 3 % = 48 500 on 2026-08-01;
    // Oct 30 %: 30 000 − 900 = 29 100 on 2026-10-01; Dec 20 % on terms: invoiced 2027-02-01,
    // due 30 days later on 2027-03-03, 20 000 in March.
    const s = cashSchedule(lines, plan);
    expect(s.months.map((m) => m.month)).toEqual(['2026-08', '2026-09', '2026-10', '2026-11', '2026-12', '2027-01', '2027-02', '2027-03']);
    expect(s.months.map((m) => m.cash)).toEqual([48_500, 0, 29_100, 0, 0, 0, 0, 20_000]);
    expect(s.months.map((m) => m.bookedTonnes)).toEqual([100, 0, 60, 0, 40, 0, 0, 0]);
    expect(s.months.at(-1)!.cumulative).toBe(97_600);
    expect(s.tranches.find((t) => !t.prepay)).toMatchObject({ payDate: '2027-03-03', payMonth: '2027-03', paid: 20_000, financingCost: null });
    expect(s.totals).toMatchObject({ listValue: 100_000, prepayDiscount: 2_400, cash: 97_600, peakMonth: '2026-08', peakCash: 48_500 });
  });

  it('weighs the prepayment discount against the interest on paying early', () => {
    // Simple interest, actual/365, to the due date 2027-03-03: Aug 1 → 214 days, Oct 1 → 153 days.
    // 48 500 × 6 % × 214/365 = 1 706.14; 29 100 × 6 % × 153/365 = 731.89; net 2 400 − 2 438.03 = −38.03.
    const s = cashSchedule(lines, plan);
    const [aug, oct] = s.tranches;
    expect(aug!.financingCost).toBeCloseTo((48_500 * 0.06 * 214) / 365, 8);
    expect(oct!.financingCost).toBeCloseTo((29_100 * 0.06 * 153) / 365, 8);
    expect(s.totals.netPrepaySaving).toBeCloseTo(2_400 - (48_500 * 0.06 * 214) / 365 - (29_100 * 0.06 * 153) / 365, 8);
    expect(cashSchedule(lines, { ...plan, financingRatePct: null }).totals.netPrepaySaving).toBeNull();
  });

  it('when the shares do not add up to 100 %, says by how much and where', () => {
    const bad = { ...plan, months: [{ month: '2026-08', share: 0.5, prepay: true }, { month: '2026-09', share: 0.4, prepay: true }] };
    expect(() => cashSchedule(lines, bad)).toThrow(BudgetInputError);
    try {
      cashSchedule(lines, bad);
    } catch (e) {
      expect((e as BudgetInputError).message).toBe('The booked shares must add up to 1 (100 %); they add up to 90 %');
      expect((e as BudgetInputError).path).toBe('bookingPlan.months');
    }
  });

  it('when delivery comes before the last booking, or months repeat, names the field', () => {
    expect(() => cashSchedule(lines, { ...plan, deliveryMonth: '2026-11' })).toThrow(/Delivery \(2026-11\) cannot come before the last booking month \(2026-12\)/);
    const repeated = { ...plan, months: [{ month: '2026-08', share: 0.5, prepay: true }, { month: '2026-08', share: 0.5, prepay: true }] };
    expect(() => cashSchedule(lines, repeated)).toThrow(/in order/);
  });
});
