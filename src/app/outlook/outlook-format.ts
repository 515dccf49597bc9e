import type { QuantitySummary } from './outlook-types';

const nf = (min: number, max = min) => new Intl.NumberFormat('en-GB', { minimumFractionDigits: min, maximumFractionDigits: max });
const whole = nf(0);
const one = nf(1);
const two = nf(2);
const three = nf(3);

const minus = (s: string) => s.replace('-', '−');

/**
 * A projected quantity with the precision of the outlook e-mail (server/mail/outlook-mail.ts
 * fmtQuantity): whole units from 100 up, one decimal below. Farm tonnes and co-op kilograms both read well.
 */
export function formatQuantity(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return minus(Math.abs(v) >= 100 ? whole.format(v) : one.format(v));
}

/** A price: two decimals from 10 up (195.40 EUR/t), three below (1.152 EUR/kg N), as in the e-mail. */
export function formatPrice(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return minus(Math.abs(v) >= 10 ? two.format(v) : three.format(v));
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
  return `${whole.format(v * 100)} %`;
}

/** "1,234–1,890" */
export function formatBand(q: Pick<QuantitySummary, 'p5' | 'p95'> | null | undefined): string {
  return q ? `${formatQuantity(q.p5)}–${formatQuantity(q.p95)}` : '—';
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
  return `${y}/${String((y + 1) % 100).padStart(2, '0')}`;
}

/** "262 ha of land, trend index 21": the fixed factors a farm was projected at, land first. */
export function describeFixed(fixed: Record<string, number>): string {
  const parts: string[] = [];
  if (fixed['land_ha'] !== undefined) parts.push(`${formatQuantity(fixed['land_ha'])} ha of land`);
  for (const [k, v] of Object.entries(fixed)) {
    if (k === 'land_ha') continue;
    parts.push(k === 'trend' ? `trend index ${Math.round(v)}` : `${k} ${formatQuantity(v)}`);
  }
  return parts.join(', ');
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
