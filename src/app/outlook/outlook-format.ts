import { minus, priceText, quantityText } from '../../../shared/number-format';
import { seasonLabel } from '../../../shared/season-calendar';
import type { QuantitySummary } from './outlook-api-types';

const nf = (min: number, max = min) => new Intl.NumberFormat('en-GB', { minimumFractionDigits: min, maximumFractionDigits: max });

/**
 * A projected quantity at the precision its ±2 % bands allow: four significant figures from
 * 10,000 up (1,423,282 kg N → "1,423,000"), whole units from 100 up, one decimal below (18.8 days).
 * Screens only: CSV exports carry the full value (csvCell).
 */
export function formatQuantity(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return quantityText(v);
}

/** A grid column's `valueFormatter` for projected quantities: formatQuantity, "—" where there is no figure. */
export const quantityCell = (p: { value: unknown }): string => (typeof p.value === 'number' ? formatQuantity(p.value) : '—');

/**
 * A price: two decimals from 10 up (195.40 EUR/t), three below (1.152 EUR/kg N), by the rule the
 * server's explanations and the e-mails use too (shared/number-format.ts): 1.3215 reads 1.322 everywhere.
 */
export function formatPrice(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return priceText(v);
}

/** A price with its unit: "178.92 EUR/t", "1.740 EUR/kg N"; "—" when there is none. */
export function formatPriceIn(v: number | null | undefined, unit: string | null | undefined): string {
  const p = formatPrice(v);
  return p === '—' || !unit ? p : `${p} ${unit}`;
}

/** A percentage already in percent units (12.3 → "12.3 %"). */
export function formatPercent(v: number | null | undefined, digits = 1): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return `${minus(nf(digits).format(v))} %`;
}

/** A signed percentage, "+4.1 %" or "−2.0 %". */
export function formatSignedPercent(v: number | null | undefined, digits = 1): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return `${v > 0 ? '+' : ''}${formatPercent(v, digits)}`;
}

/** A share 0..1 as a whole percentage ("87 %"). */
export function formatShare(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return `${nf(0).format(v * 100)} %`;
}

/** "1,234–1,890" */
export function formatBand(q: Pick<QuantitySummary, 'p5' | 'p95'> | null | undefined): string {
  // Word joiners keep a narrow card from breaking the band at its dash.
  return q ? `${formatQuantity(q.p5)}\u2060–\u2060${formatQuantity(q.p95)}` : '—';
}

/** "2026-12-02T10:15:00Z" → "2 Dec 2026, 10:15" in the reader's time zone. */
export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '—';
  return new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' }).format(d);
}

export function formatDate(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '—';
  return new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric' }).format(d);
}

/** The first 12 hex digits of a data hash: enough to tell snapshots apart on screen. */
export function shortHash(hash: string | null | undefined): string {
  return hash ? hash.slice(0, 12) : '—';
}

/** The next season label after the latest one ("2025/26" → "2026/27"); the current year's season when none exists. */
export function nextSeasonLabel(latestStartYear: number | null, now = new Date()): string {
  const y = latestStartYear !== null ? latestStartYear + 1 : now.getFullYear();
  return seasonLabel(y);
}

/**
 * The season a new outlook is suggested for: a season already opened ahead (it starts this calendar
 * year or later, e.g. set up for forward contracts) that has no outlook yet, else the next after the latest.
 */
export function suggestedOutlookSeason(seasons: readonly { label: string; startYear: number }[], taken: readonly string[], now = new Date()): string {
  const latest = seasons.length ? seasons.reduce((a, b) => (b.startYear > a.startYear ? b : a)) : null;
  if (latest && latest.startYear >= now.getFullYear() && !taken.includes(latest.label)) return latest.label;
  return nextSeasonLabel(latest?.startYear ?? null, now);
}

/** A fixed factor's stored name in plain words ("stock_lu" → "stock lu"); land has its own words. */
const factorWords = (k: string) => (k === 'land_ha' ? 'land' : k.replace(/_/g, ' '));

/** "262 ha of land, trend index 21": the fixed factors a farm was projected at, land first. */
export function describeFixed(fixed: Record<string, number>): string {
  const parts: string[] = [];
  if (fixed['land_ha'] !== undefined) parts.push(`${formatQuantity(fixed['land_ha'])} ha of land`);
  for (const [k, v] of Object.entries(fixed)) {
    if (k === 'land_ha') continue;
    parts.push(k === 'trend' ? `trend index ${Math.round(v)}` : `${factorWords(k)} ${formatQuantity(v)}`);
  }
  return parts.join(', ');
}

/**
 * Where a farm's fixed factors came from, in plain words. The server writes "land recorded for
 * 2025/26"; versions published before it wrote the stored names ("land_ha of 2025/26", "land_ha
 * from the farm register"), which read the same way here.
 */
export function describeFixedSource(source: string | null | undefined): string {
  if (!source) return '';
  return source
    .split(', ')
    .map((part) => {
      const register = /^(\w+) from the farm register$/.exec(part);
      if (register) return `${factorWords(register[1]!)} on the farm register`;
      const recorded = /^(\w+) of (\S+)$/.exec(part);
      if (recorded) return `${factorWords(recorded[1]!)} recorded for ${recorded[2]}`;
      return part.replace(/\bland_ha\b/g, 'land');
    })
    .join(', ');
}

/**
 * One sentence on which land figure a farm was projected at and why, for readers who also see the
 * farm register's figure (the farm page), which can differ from the land recorded for a season.
 */
export function landSentence(f: { fixed: Record<string, number>; fixedSource: string }, yours = false): string {
  const land = f.fixed['land_ha'];
  if (land === undefined) return '';
  const ha = `${formatQuantity(land)} ha`;
  const season = /(?:land_ha of|land recorded for) (\S+)/.exec(f.fixedSource)?.[1];
  const whose = yours ? 'your farm' : 'the farm';
  if (season)
    return `The projection uses the ${ha} of land recorded for ${season}, the latest season with records, because the model learnt from recorded seasons; the land on the farm register can differ (it may already hold next season's area) and is not used here.`;
  return `No land is recorded for any season of ${whose}, so the projection uses the ${ha} on the farm register.`;
}

/**
 * For `exportDataAsCsv({ processCellCallback })`: numbers as they are, text made spreadsheet-safe
 * (a leading =, +, -, @, tab or carriage return gets an apostrophe, as the OWASP "CSV Injection"
 * guidance recommends).
 */
export function csvCell(params: { value: unknown }): string {
  const v = params.value;
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return String(v);
  const s = String(v);
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}
