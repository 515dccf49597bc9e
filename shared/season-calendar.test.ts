import { describe, expect, it } from 'vitest';
import { calendarWords, DEFAULT_SEASON_CALENDAR, defaultBookingMonths, monthsOutsideInputs, seasonCalendarSchema, seasonWindows } from './season-calendar.js';

describe('season calendar', () => {
  it('by default names a season for the harvest that begins it, and buys its inputs in the months before', () => {
    // Season 2027/28: crop delivered Jul – Sep 2027; fertiliser bought Aug 2026 – Mar 2027 (docs/fertiliser.md §7).
    expect(seasonWindows(DEFAULT_SEASON_CALENDAR, 2027)).toEqual({ season: '2027/28', inputs: { from: '2026-08', to: '2027-03' }, crop: { from: '2027-07', to: '2027-09' } });
    expect(calendarWords(DEFAULT_SEASON_CALENDAR, 2027)).toBe('Season 2027/28: inputs bought Aug 2026 – Mar 2027, crop delivered Jul 2027 – Sep 2027');
    // The old fixed booking (Aug 2027 – Jan 2028) lies after that season's harvest.
    expect(monthsOutsideInputs(DEFAULT_SEASON_CALENDAR, 2027, ['2027-08', '2027-10', '2028-01'])).toEqual(['2027-08', '2027-10', '2028-01']);
    expect(defaultBookingMonths(DEFAULT_SEASON_CALENDAR, 2027)).toEqual({
      months: [
        { month: '2026-08', sharePct: 40, prepay: true },
        { month: '2026-10', sharePct: 40, prepay: true },
        { month: '2027-01', sharePct: 20, prepay: false },
      ],
      deliveryMonth: '2027-02',
    });
  });

  it('follows a co-op that names seasons for the year they are sown, and books a short window at once', () => {
    const cropYear = { inputsFrom: { month: 9, year: 0 }, inputsTo: { month: 11, year: 0 }, cropFrom: { month: 7, year: 1 }, cropTo: { month: 8, year: 1 } };
    expect(seasonCalendarSchema.parse(cropYear)).toEqual(cropYear);
    expect(defaultBookingMonths(cropYear, 2027)).toEqual({ months: [{ month: '2027-09', sharePct: 100, prepay: true }], deliveryMonth: '2027-11' });
  });

  it('refuses a calendar that buys inputs after the crop they grow, naming the field', () => {
    const r = seasonCalendarSchema.safeParse({ ...DEFAULT_SEASON_CALENDAR, inputsFrom: { month: 8, year: 0 }, inputsTo: { month: 10, year: 0 } });
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => [i.path.join('.'), i.message])).toEqual([['inputsFrom', 'Inputs are bought before the crop they grow is delivered']]);
  });
});
