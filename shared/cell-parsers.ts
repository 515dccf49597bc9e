/**
 * Parsing of single cells with messages a planner can act on. Each parser answers either the value or
 * a message that quotes the cell; the caller adds the row and column.
 */
import { DateTime } from 'luxon';

export type Parsed<T> = { ok: true; value: T } | { ok: false; message: string };

const ok = <T>(value: T): Parsed<T> => ({ ok: true, value });
const fail = <T>(message: string): Parsed<T> => ({ ok: false, message });

/** Plain decimal: optional sign, digits, one point, optional exponent. Nothing else is a number here. */
const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
/** Digits mixed with separators: a number written with thousands separators or a decimal comma. */
const SEPARATED_NUMBER = /^[+-]?[\d\s.,'\u00a0\u202f]+$/;
const DECIMAL_COMMA = /^[+-]?\d+,\d+$/;
const THOUSANDS_LIKE = /^[+-]?\d{1,3},\d{3}$/;

/** Shows a cell in a message: quoted, and shortened when long. */
export function quote(raw: string): string {
  const s = raw.length > 60 ? `${raw.slice(0, 57)}...` : raw;
  return JSON.stringify(s);
}

/**
 * A number written plainly (1234.5, -0.25, 1e3). A decimal comma or thousands separators are refused
 * rather than guessed: "1,234" is 1234 in one country and 1.234 in another.
 */
export function parseDecimal(raw: string): Parsed<number> {
  const s = raw.trim();
  if (s === '') return fail('empty cell');
  if (PLAIN_NUMBER.test(s)) {
    const v = Number(s);
    return Number.isFinite(v) ? ok(v) : fail(`${quote(s)} is too large`);
  }
  if (SEPARATED_NUMBER.test(s) && /\d/.test(s)) {
    if (DECIMAL_COMMA.test(s) && !THOUSANDS_LIKE.test(s)) return fail(`${quote(s)} uses a comma for decimals: write ${s.replace(',', '.')}`);
    return fail(`${quote(s)} is ambiguous: write numbers with a point for decimals and no thousands separators (e.g. 1234.5)`);
  }
  return fail(`${quote(s)} is not a number`);
}

/** A calendar date as YYYY-MM-DD; other spellings are refused with the reason. */
export function parseIsoDate(raw: string): Parsed<string> {
  const s = raw.trim();
  if (s === '') return fail('empty cell');
  let m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (m) {
    const d = DateTime.fromObject({ year: +m[1], month: +m[2], day: +m[3] }, { zone: 'utc' });
    return d.isValid ? ok(s) : fail(`${quote(s)} is not a date in the calendar`);
  }
  m = /^(\d{4})[/.](\d{1,2})[/.](\d{1,2})$/.exec(s);
  if (m) {
    const iso = `${m[1]}-${m[2].padStart(2, '0')}-${m[3].padStart(2, '0')}`;
    return fail(`${quote(s)}: write dates as YYYY-MM-DD (${iso})`);
  }
  if (/^\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}$/.test(s)) {
    return fail(`${quote(s)} is ambiguous (day/month or month/day?): write dates as YYYY-MM-DD`);
  }
  return fail(`${quote(s)} is not a date: write dates as YYYY-MM-DD`);
}

export interface SeasonRef {
  id: number;
  label: string;
  startYear: number;
}

const SEASON = /^(\d{4})(?:\s*[/-]\s*(\d{2}|\d{4}))?$/;

/**
 * A season by its label (2014/15) or its first year (2014, as in the fit command's layout); 2014-15
 * and 2014/2015 name the same season.
 */
export function parseSeason(raw: string, seasons: readonly SeasonRef[], byLabel: Map<string, SeasonRef>, byYear: Map<number, SeasonRef>): Parsed<SeasonRef> {
  const s = raw.trim();
  if (s === '') return fail('empty cell');
  const labelled = byLabel.get(s.toLowerCase());
  if (labelled) return ok(labelled);
  const m = SEASON.exec(s);
  if (!m) return fail(`${quote(s)} is not a season: write it as 2014/15 or 2014`);
  const start = Number(m[1]);
  if (m[2]) {
    const end = Number(m[2]);
    const follows = m[2].length === 2 ? end === (start + 1) % 100 : end === start + 1;
    if (!follows) return fail(`${quote(s)} is not a season: the second year must follow the first (${start}/${String((start + 1) % 100).padStart(2, '0')})`);
  }
  const found = byYear.get(start);
  if (found) return ok(found);
  const years = seasons.map((x) => x.startYear).sort((a, b) => a - b);
  const range = years.length
    ? ` (seasons run from ${seasons.find((x) => x.startYear === years[0])!.label} to ${seasons.find((x) => x.startYear === years[years.length - 1])!.label})`
    : ' (no seasons are set up yet)';
  return fail(`unknown season ${quote(s)}${range}`);
}

/** A currency as a three-letter code (ISO 4217 style); lower case is accepted and upper-cased. */
export function parseCurrency(raw: string): Parsed<string> {
  const s = raw.trim();
  if (s === '') return fail('empty cell');
  if (/^[A-Za-z]{3}$/.test(s)) return ok(s.toUpperCase());
  return fail(`${quote(s)} is not a currency code: use three letters such as EUR`);
}

/**
 * Undoes the formula escape of our exports (and of spreadsheets' own text prefix): a leading
 * apostrophe before =, +, -, @, tab or CR is dropped, so an exported cell reads back as it was.
 */
export function unescapeFormula(s: string): string {
  return /^'[=+\-@\t\r]/.test(s) ? s.slice(1) : s;
}
