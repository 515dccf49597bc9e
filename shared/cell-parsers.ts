/**
 * Parsing of single cells with messages a planner can act on. Each parser answers either the value or
 * a message that quotes the cell; the caller adds the row and column.
 */
import { DateTime } from 'luxon';
import { seasonLabel } from './season-calendar.js';

export type Parsed<T> = { ok: true; value: T } | { ok: false; message: string };

const ok = <T>(value: T): Parsed<T> => ({ ok: true, value });
const fail = <T>(message: string): Parsed<T> => ({ ok: false, message });

/** Shows a cell in a message: quoted, and shortened when long. */
export function quote(raw: string): string {
  const s = raw.length > 60 ? `${raw.slice(0, 57)}...` : raw;
  return JSON.stringify(s);
}

/** How a co-op writes decimals: 1234.5 (`point`, as in the UK, Ireland and the US) or 1234,5 (`comma`, most of Europe). */
export const DECIMAL_MARKS = ['point', 'comma'] as const;
export type DecimalMark = (typeof DECIMAL_MARKS)[number];

/** The character of each decimal mark and the one the same convention groups thousands with. */
const MARK = { point: { decimal: '.', group: ',' }, comma: { decimal: ',', group: '.' } } as const;

const esc = (c: string) => (c === '.' ? '\\.' : c);
/** Spaces a spreadsheet groups thousands with: space, no-break space, narrow no-break space. */
const SPACE_GROUP = '[ \\u00a0\\u202f]';

function numberPatterns(mark: DecimalMark) {
  const d = esc(MARK[mark].decimal);
  const g = esc(MARK[mark].group);
  return {
    /** Digits, one decimal mark, an optional exponent: 1234,5 or 1234.5, -0,25, 1,5e3. */
    plain: new RegExp(`^[+-]?(\\d+(${d}\\d*)?|${d}\\d+)([eE][+-]?\\d+)?$`),
    /** Thousands in groups of three by spaces, with or without decimals: 1 234 567,5. */
    spaced: new RegExp(`^[+-]?\\d{1,3}(${SPACE_GROUP}\\d{3})+(${d}\\d+)?$`),
    /** Thousands grouped by the convention's own separator AND a decimal part: 1.234,5 (comma) or 1,234.5 (point). */
    grouped: new RegExp(`^[+-]?\\d{1,3}(${g}\\d{3})+${d}\\d+$`),
  };
}
const PATTERNS = { point: numberPatterns('point'), comma: numberPatterns('comma') };

/** A number shown in a message in the co-op's own writing: 204.5 or 204,5. */
export function numberInMark(value: number, mark: DecimalMark): string {
  const s = String(value);
  return mark === 'comma' ? s.replace('.', ',') : s;
}

/** How a decimal mark is named in messages. */
export function markName(mark: DecimalMark): string {
  return mark === 'comma' ? 'a decimal comma (1234,5)' : 'a decimal point (1234.5)';
}

/**
 * A number written in the co-op's convention (`mark`): 204.5 with a point, 204,5 with a comma; an
 * exponent (1.5e3) and thousands grouped by spaces are read in both. Anything else is refused with
 * the reason, never reinterpreted: "204,5" under a point is not 2045 and not 204.5, "2O4,5" (a
 * letter O) is not 245, and "1.234" under a comma is refused because the same text is 1.234 under a
 * point. Thousands grouped by the convention's own separator are read only when a decimal part
 * follows (1.234,5 under a comma), which no other convention reads differently.
 */
export function parseNumber(raw: string, mark: DecimalMark): Parsed<number> {
  const s = raw.trim();
  if (s === '') return fail('empty cell');
  const p = PATTERNS[mark];
  const { decimal, group } = MARK[mark];
  let clean: string | null = null;
  if (p.plain.test(s)) clean = s;
  else if (p.spaced.test(s)) clean = s.replace(/[ \u00a0\u202f]/g, '');
  else if (p.grouped.test(s)) clean = s.split(group).join('');
  if (clean !== null) {
    const v = Number(mark === 'comma' ? clean.replace(',', '.') : clean);
    return Number.isFinite(v) ? ok(v) : fail(`${quote(s)} is too large`);
  }
  const stray = /[^0-9+\-.,eE \u00a0\u202f']/.exec(s);
  if (stray) {
    const what = /\p{L}/u.test(stray[0]) ? `the letter ${quote(stray[0])}` : `the character ${quote(stray[0])}`;
    return fail(`${quote(s)} is not a number: it has ${what} in it`);
  }
  if (!/\d/.test(s)) return fail(`${quote(s)} is not a number`);
  const other = mark === 'comma' ? 'point' : 'comma';
  if (new RegExp(`^[+-]?\\d{1,3}(${esc(group)}\\d{3})+$`).test(s)) {
    const sep = group === '.' ? 'points' : 'commas';
    return fail(`${quote(s)} is ambiguous: with ${markName(mark)} write thousands without ${sep} (${s.split(group).join('')}), so they cannot be misread as decimals`);
  }
  if (PATTERNS[other].plain.test(s) || PATTERNS[other].grouped.test(s) || PATTERNS[other].spaced.test(s)) {
    return fail(`${quote(s)} is written with ${markName(other)}, but this co-op writes numbers with ${markName(mark)}; it was not read (the decimal mark is a co-op setting, and an import can choose its own)`);
  }
  return fail(`${quote(s)} is not a clean number: write it with ${markName(mark)} and no thousands separators`);
}

/** A number written with a decimal point (the fit command's files, index values pasted into forms). */
export function parseDecimal(raw: string): Parsed<number> {
  return parseNumber(raw, 'point');
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
  m = /^(\d{1,2})([/.-])(\d{1,2})\2(\d{4})$/.exec(s);
  if (m) {
    // Day and month are told apart only when one of them cannot be a month: 14/08/2026 is the 14th of
    // August in any order, 03/04/2026 is March or April.
    const [a, b, year] = [+m[1], +m[3], +m[4]];
    if (a <= 12 && b <= 12 && a !== b) return fail(`${quote(s)} is ambiguous (day/month or month/day?): write dates as YYYY-MM-DD`);
    const [day, month] = a > 12 ? [a, b] : b > 12 ? [b, a] : [a, b];
    const d = DateTime.fromObject({ year, month, day }, { zone: 'utc' });
    return d.isValid ? ok(d.toISODate()!) : fail(`${quote(s)} is not a date in the calendar`);
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

/** A season as a cell writes it: 2014/15, 2014-15, 2014/2015 or 2014; group 1 is the first year. */
export const SEASON_CELL = /^(\d{4})(?:\s*[/-]\s*(\d{2}|\d{4}))?$/;

/**
 * A season by its label (2014/15) or its first year (2014, as in the fit command's layout); 2014-15
 * and 2014/2015 name the same season.
 */
export function parseSeason(raw: string, seasons: readonly SeasonRef[], byLabel: Map<string, SeasonRef>, byYear: Map<number, SeasonRef>): Parsed<SeasonRef> {
  const s = raw.trim();
  if (s === '') return fail('empty cell');
  const labelled = byLabel.get(s.toLowerCase());
  if (labelled) return ok(labelled);
  const m = SEASON_CELL.exec(s);
  if (!m) return fail(`${quote(s)} is not a season: write it as 2014/15 or 2014`);
  const start = Number(m[1]);
  if (m[2]) {
    const end = Number(m[2]);
    const follows = m[2].length === 2 ? end === (start + 1) % 100 : end === start + 1;
    if (!follows) return fail(`${quote(s)} is not a season: the second year must follow the first (${seasonLabel(start)})`);
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

/**
 * The delimiter of a CSV text, judged by its header line (the first line that is not blank): the
 * candidate that occurs most often there outside quotes. Spreadsheets in decimal-comma countries
 * write `;` between cells and `,` inside numbers, so the data lines cannot decide it, while a header
 * holds names, not numbers. Null when the header has none (one column).
 */
export function guessDelimiter(text: string): ',' | ';' | '\t' | '|' | null {
  let header = '';
  for (let at = 0; at < text.length && header.trim() === ''; ) {
    const end = text.slice(at, at + 100_000).search(/\r|\n/);
    header = end < 0 ? text.slice(at, at + 100_000) : text.slice(at, at + end);
    at += end < 0 ? text.length : end + 1;
  }
  const counts = new Map<string, number>();
  let quoted = false;
  for (const ch of header) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === ',' || ch === ';' || ch === '\t' || ch === '|')) counts.set(ch, (counts.get(ch) ?? 0) + 1);
  }
  let best: string | null = null;
  // On a tie the tab wins, then the semicolon: neither appears inside numbers.
  for (const d of ['\t', ';', ',', '|']) if ((counts.get(d) ?? 0) > (best === null ? 0 : counts.get(best)!)) best = d;
  return best as ',' | ';' | '\t' | '|' | null;
}
