import { DateTime } from 'luxon';
import { seasonLabel } from '../../../shared/season-calendar';

/** The first and last day of a season (a crop or marketing year of twelve months), in UTC dates. */
export function seasonSpan(season: { startYear: number; startMonth: number }): { start: DateTime; end: DateTime; text: string } {
  const start = DateTime.utc(season.startYear, season.startMonth, 1);
  const end = start.plus({ years: 1 }).minus({ days: 1 });
  const text = `${start.toFormat('d LLL yyyy')} – ${end.toFormat('d LLL yyyy')}`;
  return { start, end, text };
}

/** The usual label of a season: "2024/25" for a year that crosses New Year, "2024" for a calendar year. */
export function suggestedSeasonLabel(startYear: number, startMonth: number): string {
  if (startMonth === 1) return String(startYear);
  return seasonLabel(startYear);
}

export const MONTHS = Array.from({ length: 12 }, (_, i) => ({ value: i + 1, name: DateTime.utc(2000, i + 1, 1).toFormat('LLLL') }));
