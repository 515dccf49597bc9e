import type { Item } from '../../../shared/api-types';
import type { ModelDefinition } from '../../../shared/model-schemas';
import type { FitResult } from '../../../shared/estimation-types';
import type { RunState } from './models-api-types';

/** The words the screens use for a model's settings and a run's state. */
export const FORM_LABELS: Record<ModelDefinition['form'] | FitResult['layout']['form'], string> = {
  nq: 'Normalised quadratic',
  gl: 'Generalised Leontief',
  'normalized-quadratic': 'Normalised quadratic',
  'generalized-leontief': 'Generalised Leontief',
};

export const CURVATURE_LABELS: Record<ModelDefinition['curvature'], string> = {
  auto: 'Impose only when the estimate breaks it',
  impose: 'Always impose',
  check: 'Check only, never impose',
};

export const STATE_LABELS: Record<RunState, string> = {
  queued: 'Waiting',
  running: 'Running',
  succeeded: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

export const FACTOR_LABELS: Record<string, string> = {
  land_ha: 'Land (ha)',
  trend: 'Trend (technical change)',
};

/** The first 12 hex digits: enough to tell snapshots apart on screen; the full hash is in the tooltip. */
export function shortHash(hash: string | null | undefined): string {
  return hash ? hash.slice(0, 12) : '—';
}

const fixed = (digits: number) => new Intl.NumberFormat('en', { minimumFractionDigits: digits, maximumFractionDigits: digits });
const two = fixed(2);
const one = fixed(1);
const whole = fixed(0);

/** Elasticities and other unit-free ratios: two decimals ("−0.34"). */
export function formatRatio(v: number | null | undefined): string {
  return v == null || !Number.isFinite(v) ? '—' : two.format(v).replace('-', '−');
}

/** A figure with sensible precision for its size: 1 234 567, 1 234, 12.3, 0.123. */
export function formatAmount(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  const f = a >= 1000 ? whole : a >= 10 ? one : a >= 1 ? two : new Intl.NumberFormat('en', { maximumSignificantDigits: 3 });
  return f.format(v).replace('-', '−');
}

/** Significant digits, for coefficients and standard errors of any size. */
export function formatSignificant(v: number | null | undefined, digits = 4): string {
  if (v == null || !Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  if (a !== 0 && (a >= 1e7 || a < 1e-4)) return v.toExponential(digits - 1).replace('-', '−');
  return new Intl.NumberFormat('en', { maximumSignificantDigits: digits }).format(v).replace('-', '−');
}

export function formatPercent(v: number | null | undefined, digits = 1): string {
  return v == null || !Number.isFinite(v) ? '—' : `${fixed(digits).format(v).replace('-', '−')} %`;
}

/** Labels and units by item code, falling back to the code when the item list is not loaded. */
export class ItemLabels {
  readonly #byCode: Map<string, Item>;

  constructor(items: readonly Item[]) {
    this.#byCode = new Map(items.map((i) => [i.code, i]));
  }

  name(code: string): string {
    return this.#byCode.get(code)?.name ?? code;
  }

  unit(code: string): string {
    return this.#byCode.get(code)?.unit ?? '';
  }

  /** "Nitrogen (N), kg N". */
  withUnit(code: string): string {
    const unit = this.unit(code);
    return unit ? `${this.name(code)}, ${unit}` : this.name(code);
  }

  /** The price unit, e.g. "EUR/t". */
  priceUnit(code: string, currency: string): string {
    const unit = this.unit(code);
    return unit ? `${currency}/${unit}` : currency;
  }
}

/** The definition in one line, for lists: "7 items · Normalised quadratic · numeraire Hired labour · land + trend". */
export function definitionLine(def: ModelDefinition, labels?: ItemLabels): string {
  const parts = [
    `${def.items.length} items`,
    FORM_LABELS[def.form],
    `numeraire ${labels ? labels.name(def.numeraire) : def.numeraire}`,
    [...def.fixedFactors.map((f) => (f === 'land_ha' ? 'land' : f)), ...(def.trend ? ['trend'] : [])].join(' + ') || 'no fixed factors, no trend',
  ];
  if (def.fromSeason || def.toSeason) parts.push(`seasons ${sampleSeasons(def)}`);
  if (def.farms) parts.push(`${def.farms.length} chosen farms`);
  return parts.join(' · ');
}

export function factorLabel(factor: string): string {
  return FACTOR_LABELS[factor] ?? factor;
}

/** The sample's seasons in words: "2006/07 – 2025/26", "2010/11 onwards", "up to 2019/20" or "Every season with data". */
export function sampleSeasons(def: ModelDefinition): string {
  if (def.fromSeason && def.toSeason) return `${def.fromSeason} – ${def.toSeason}`;
  if (def.fromSeason) return `${def.fromSeason} onwards`;
  if (def.toSeason) return `up to ${def.toSeason}`;
  return 'Every season with data';
}
