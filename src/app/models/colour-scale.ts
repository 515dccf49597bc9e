/**
 * Netput's own diverging colour scale for signed figures such as elasticities: a warm clay for
 * values below zero, a cool lake blue for values above, meeting at the straw neutral of the app's
 * surface. Stops are spaced evenly from 0 to the scale's limit; values past the limit take the end
 * colour. Text on each cell is dark or white, whichever contrasts more (WCAG 2 contrast ratio).
 */

export const SCALE_NEUTRAL = '#f7f4ec';

/** From the neutral (first) to the strongest (last) colour, for |value| = 0, ¼, ½, ¾ and 1 × limit. */
export const SCALE_BELOW_ZERO = [SCALE_NEUTRAL, '#f0d4c0', '#dc9468', '#b25a2c', '#6e2e12'] as const;
export const SCALE_ABOVE_ZERO = [SCALE_NEUTRAL, '#d2e5e6', '#82b6bc', '#2f7a86', '#0f4652'] as const;

/**
 * Pure black and white: between them every background reaches at least 4.58:1 (the two ratios meet
 * at luminance 0.179); an off-black would leave a band of mid tones below 4.5:1.
 */
export const DARK_TEXT = '#000000';
export const LIGHT_TEXT = '#ffffff';
/** Cells without a value (not estimated). */
export const MISSING_COLOUR = '#e4e1d8';

export interface CellColour {
  background: string;
  text: string;
}

type Rgb = [number, number, number];

function parseHex(hex: string): Rgb {
  const m = /^#?([0-9a-f]{6})$/i.exec(hex.trim());
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`);
  const n = parseInt(m[1]!, 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

function toHex([r, g, b]: Rgb): string {
  return `#${[r, g, b].map((c) => Math.round(c).toString(16).padStart(2, '0')).join('')}`;
}

/** Straight-line mix of two #rrggbb colours in sRGB (t = 0 gives `a`, 1 gives `b`). */
export function mix(a: string, b: string, t: number): string {
  const ca = parseHex(a);
  const cb = parseHex(b);
  return toHex([0, 1, 2].map((k) => ca[k]! + (cb[k]! - ca[k]!) * t) as Rgb);
}

/** WCAG 2 relative luminance of an sRGB colour. */
export function relativeLuminance(hex: string): number {
  const [r, g, b] = parseHex(hex).map((c) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  }) as Rgb;
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2 contrast ratio (1 to 21) between two colours. */
export function contrastRatio(a: string, b: string): number {
  const la = relativeLuminance(a);
  const lb = relativeLuminance(b);
  return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05);
}

/** The text colour, dark or white, that contrasts more with `background`. */
export function textOn(background: string): string {
  return contrastRatio(background, DARK_TEXT) >= contrastRatio(background, LIGHT_TEXT) ? DARK_TEXT : LIGHT_TEXT;
}

/** The scale colour of `value` on a scale from −limit to +limit. */
export function scaleColour(value: number, limit: number): CellColour {
  if (!Number.isFinite(value) || !(limit > 0)) return { background: MISSING_COLOUR, text: DARK_TEXT };
  const stops = value < 0 ? SCALE_BELOW_ZERO : SCALE_ABOVE_ZERO;
  const t = Math.min(Math.abs(value) / limit, 1) * (stops.length - 1);
  const k = Math.min(Math.floor(t), stops.length - 2);
  const background = mix(stops[k]!, stops[k + 1]!, t - k);
  return { background, text: textOn(background) };
}

/**
 * A round limit for the scale: the smallest of 1, 2.5 and 5 times a power of ten that covers the
 * largest |value|, so that one strong cell does not wash out the rest more than it must.
 */
export function scaleLimit(values: Iterable<number>): number {
  let max = 0;
  for (const v of values) if (Number.isFinite(v)) max = Math.max(max, Math.abs(v));
  if (max === 0) return 1;
  const power = 10 ** Math.floor(Math.log10(max));
  for (const step of [1, 2.5, 5, 10]) {
    const limit = step * power;
    if (limit >= max * (1 - 1e-12)) return Number(limit.toPrecision(12));
  }
  return 10 * power;
}

/** A CSS linear-gradient of the whole scale, from −limit (left) to +limit (right), for legends. */
export function scaleGradient(): string {
  const below = [...SCALE_BELOW_ZERO].reverse();
  const all = [...below, ...SCALE_ABOVE_ZERO.slice(1)];
  return `linear-gradient(to right, ${all.map((c, i) => `${c} ${((100 * i) / (all.length - 1)).toFixed(1)}%`).join(', ')})`;
}

/**
 * The default limit for elasticity tables: rounded up from the largest |value| but never beyond 1,
 * the line between inelastic and elastic responses, so one large own-price value (often the
 * numeraire's) does not wash out every other cell; cells past ±1 take the end colours.
 */
export const ELASTICITY_SCALE_CAP = 1;

export function elasticityScaleLimit(values: Iterable<number>): number {
  return Math.min(scaleLimit(values), ELASTICITY_SCALE_CAP);
}
