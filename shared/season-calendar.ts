/**
 * The co-op's season calendar: when the inputs of a season are bought and when its crop is
 * delivered, each month placed relative to the season's first calendar year (season "2027/28" has
 * first year 2027). One declaration for the settings page, the outlook and the budget.
 *
 * The default follows the marketing-year convention of the grain trade, in which season "2027/28"
 * begins with the 2027 harvest (the EU cereals marketing year runs 1 July to 30 June; from memory,
 * see docs/fertiliser.md §6.6): the crop is delivered from July to September of the season's first
 * year, and its fertiliser is bought in the months before and around sowing, from August of the
 * year before to March of the first year (autumn base dressing, spring top dressing; common
 * practice, no source). A co-op that names seasons otherwise changes the setting.
 */
import { z } from 'zod';

const monthRefSchema = z.strictObject({
  month: z.number().int().min(1, 'Choose a month from 1 to 12').max(12, 'Choose a month from 1 to 12'),
  /** −1: the year before the season's first year; 0: its first year; 1: its second year. */
  year: z.number().int().min(-1, 'Choose a year from the year before the season to its second year').max(1, 'Choose a year from the year before the season to its second year'),
});
export type MonthRef = z.output<typeof monthRefSchema>;

const index = (r: MonthRef) => r.year * 12 + r.month - 1;

export const seasonCalendarSchema = z
  .strictObject({
    /** First and last month in which the season's inputs (fertiliser) are booked and bought. */
    inputsFrom: monthRefSchema,
    inputsTo: monthRefSchema,
    /** First and last month in which the season's crop is delivered to the co-op. */
    cropFrom: monthRefSchema,
    cropTo: monthRefSchema,
  })
  .superRefine((c, ctx) => {
    if (index(c.inputsTo) < index(c.inputsFrom)) ctx.addIssue({ code: 'custom', message: 'The last month of buying inputs comes before the first', path: ['inputsTo'] });
    if (index(c.cropTo) < index(c.cropFrom)) ctx.addIssue({ code: 'custom', message: 'The last delivery month comes before the first', path: ['cropTo'] });
    if (index(c.inputsFrom) >= index(c.cropFrom)) ctx.addIssue({ code: 'custom', message: 'Inputs are bought before the crop they grow is delivered', path: ['inputsFrom'] });
  });
export type SeasonCalendar = z.output<typeof seasonCalendarSchema>;

export const DEFAULT_SEASON_CALENDAR: SeasonCalendar = {
  inputsFrom: { month: 8, year: -1 },
  inputsTo: { month: 3, year: 0 },
  cropFrom: { month: 7, year: 0 },
  cropTo: { month: 9, year: 0 },
};

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;
export const MONTH_NAMES = MONTHS;
export const YEAR_WORDS: Record<MonthRef['year'] & number, string> = { [-1]: 'year before the season', 0: "season's first year", 1: "season's second year" };

/** "2027-03" for a month of the season that starts in startYear. */
export function monthOf(ref: MonthRef, startYear: number): string {
  return `${startYear + ref.year}-${String(ref.month).padStart(2, '0')}`;
}

/** "2026-08" → "Aug 2026". */
export function monthWords(month: string): string {
  const [y, m] = month.split('-');
  return `${MONTHS[Number(m) - 1]} ${y}`;
}

/** "2027/28" for 2027. */
export const seasonLabel = (startYear: number) => `${startYear}/${String((startYear + 1) % 100).padStart(2, '0')}`;

export interface SeasonWindows {
  season: string;
  inputs: { from: string; to: string };
  crop: { from: string; to: string };
}

export function seasonWindows(calendar: SeasonCalendar, startYear: number): SeasonWindows {
  return {
    season: seasonLabel(startYear),
    inputs: { from: monthOf(calendar.inputsFrom, startYear), to: monthOf(calendar.inputsTo, startYear) },
    crop: { from: monthOf(calendar.cropFrom, startYear), to: monthOf(calendar.cropTo, startYear) },
  };
}

const span = (a: string, b: string) => (a === b ? monthWords(a) : `${monthWords(a)} – ${monthWords(b)}`);

/** "Season 2027/28: inputs bought Aug 2026 – Mar 2027, crop delivered Jul 2027 – Sep 2027". */
export function calendarWords(calendar: SeasonCalendar, startYear: number): string {
  const w = seasonWindows(calendar, startYear);
  return `Season ${w.season}: inputs bought ${span(w.inputs.from, w.inputs.to)}, crop delivered ${span(w.crop.from, w.crop.to)}`;
}

function addMonths(month: string, n: number): string {
  const [y, m] = month.split('-').map(Number) as [number, number];
  const i = y * 12 + (m - 1) + n;
  return `${Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}`;
}

/**
 * A starting booking pattern inside the season's input window (common practice, no source): 40 %
 * booked in its first month and 40 % two months later, both prepaid; the last 20 % three months
 * before the window closes, on terms, with delivery in the window's second-to-last month. A window
 * too short for that books everything in its first month and takes delivery in its last. The
 * treasurer replaces it with the co-op's own programme; no discount is assumed.
 */
export function defaultBookingMonths(calendar: SeasonCalendar, startYear: number): { months: { month: string; sharePct: number; prepay: boolean }[]; deliveryMonth: string } {
  const { from, to } = seasonWindows(calendar, startYear).inputs;
  const second = addMonths(from, 2);
  const third = addMonths(to, -2);
  if (third <= second) return { months: [{ month: from, sharePct: 100, prepay: true }], deliveryMonth: to };
  return {
    months: [
      { month: from, sharePct: 40, prepay: true },
      { month: second, sharePct: 40, prepay: true },
      { month: third, sharePct: 20, prepay: false },
    ],
    deliveryMonth: addMonths(to, -1),
  };
}

/** The booking months outside the season's input window, e.g. ["2027-08"]. */
export function monthsOutsideInputs(calendar: SeasonCalendar, startYear: number, months: string[]): string[] {
  const { from, to } = seasonWindows(calendar, startYear).inputs;
  return months.filter((m) => m < from || m > to);
}
