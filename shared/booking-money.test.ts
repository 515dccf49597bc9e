import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { bookingAmounts, formatMinor, mulDivRoundHalfUp, percentToBp, toMinor } from './booking-money.js';

/**
 * Money of a booking in minor units. The expected figures are worked by hand (closed form: the exact
 * product, then the stated rounding rule, half up); docs/bookings.md states the rules.
 */
describe('booking money in minor units', () => {
  it('rounds a × b / d half up exactly, also beyond 2^53 in the product', () => {
    expect(mulDivRoundHalfUp(1, 500, 1000)).toBe(1); // 0.5 → 1
    expect(mulDivRoundHalfUp(1, 499, 1000)).toBe(0); // 0.499 → 0
    expect(mulDivRoundHalfUp(3, 1, 2)).toBe(2); // 1.5 → 2
    expect(mulDivRoundHalfUp(5_000_000, 99_999_999, 1000)).toBe(499_999_995_000); // 5,000 t at 999,999.99 per t
    expect(() => mulDivRoundHalfUp(-1, 2, 3)).toThrow(/non-negative/);
  });

  it('a booking: list per line, discount on the whole, VAT on the discounted net', () => {
    // 12.345 t at 512.34 per t: 12,345 kg × 51,234 / 1000 = 632,483.73 → 632,484 cents;
    // 2 t at 389.90 per t: 2,000 × 38,990 / 1000 = 77,980 exactly.
    // list 710,464; discount 2.5 % = 17,761.6 → 17,762; net 692,702; VAT 20 % = 138,540.4 → 138,540; total 831,242.
    const a = bookingAmounts(
      [
        { kg: 12_345, pricePerTMinor: 51_234 },
        { kg: 2_000, pricePerTMinor: 38_990 },
      ],
      250,
      2000,
    );
    expect(a).toEqual({ lines: [632_484, 77_980], listMinor: 710_464, discountBp: 250, discountMinor: 17_762, netMinor: 692_702, vatBp: 2000, vatMinor: 138_540, totalMinor: 831_242 });
  });

  it('no discount after the deadline, and a zero VAT rate, leave the list value', () => {
    const a = bookingAmounts([{ kg: 10_000, pricePerTMinor: 45_000 }], 0, 0);
    expect(a.totalMinor).toBe(450_000);
    expect(a.discountMinor).toBe(0);
    expect(a.vatMinor).toBe(0);
  });

  it('reduced VAT (e.g. 13.5 %) and a half-cent discount round half up', () => {
    // 1 t at 100.10: list 10,010; 0.5 % discount = 50.05 → 50; net 9,960; VAT 13.5 % = 1,344.6 → 1,345; total 11,305.
    expect(bookingAmounts([{ kg: 1000, pricePerTMinor: 10_010 }], 50, 1350)).toMatchObject({ discountMinor: 50, netMinor: 9960, vatMinor: 1345, totalMinor: 11_305 });
  });

  it('percent to basis points and major to minor units', () => {
    expect(percentToBp(2.5)).toBe(250);
    expect(percentToBp(20)).toBe(2000);
    expect(percentToBp(13.5)).toBe(1350);
    expect(() => percentToBp(2.555)).toThrow(/two decimals/);
    expect(toMinor(512.34)).toBe(51_234);
    expect(toMinor(0.29)).toBe(29);
    expect(toMinor(1.005)).toBe(101);
    expect(formatMinor(831_242, 'EUR')).toBe('EUR 8,312.42');
  });

  it('property: amounts add up, never go negative, and each line is within half a cent of the exact value', () => {
    const seed = 20_261_203;
    console.log(`booking money property seed ${seed}`);
    fc.assert(
      fc.property(
        fc.array(fc.record({ kg: fc.integer({ min: 1, max: 5_000_000 }), pricePerTMinor: fc.integer({ min: 1, max: 100_000_000 }) }), { minLength: 1, maxLength: 10 }),
        fc.integer({ min: 0, max: 5000 }),
        fc.integer({ min: 0, max: 5000 }),
        (lines, d, v) => {
          const a = bookingAmounts(lines, d, v);
          expect(a.listMinor).toBe(a.lines.reduce((s, x) => s + x, 0));
          expect(a.netMinor).toBe(a.listMinor - a.discountMinor);
          expect(a.totalMinor).toBe(a.netMinor + a.vatMinor);
          expect(a.discountMinor).toBeLessThanOrEqual(a.listMinor);
          expect(a.netMinor).toBeGreaterThanOrEqual(0);
          lines.forEach((l, i) => {
            const twice = BigInt(l.kg) * BigInt(l.pricePerTMinor) * 2n;
            const got = BigInt(a.lines[i]!) * 2000n;
            expect(got - twice <= 1000n && twice - got < 1000n).toBe(true);
          });
        },
      ),
      { numRuns: 300, seed },
    );
  });
});
