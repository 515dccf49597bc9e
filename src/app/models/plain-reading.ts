/**
 * Result readings in plain words for people who are not economists: what a fitted elasticity
 * matrix, the shadow values and the back-test say, sentence by sentence. The numbers come from the
 * fit as stored; this file only turns them into words.
 */
import { RETURN_NAME, RETURN_NOTE } from '../../../shared/return-words';

export interface ReadingItem {
  code: string;
  /** The name planners know the item by (from the item list), e.g. "Nitrogen (N)". */
  name: string;
  role: 'output' | 'input';
}

export interface PlainReading {
  /** The item whose price rises. */
  price: string;
  text: string;
}

/** How a price rise is described; the elasticity is a point slope, so "about" and a small rise. */
export const PRICE_RISE_PCT = 10;

/** Changes smaller than this (in %) are read as "practically unchanged". */
const NEGLIGIBLE_PCT = 0.05;

/** 1.96: two-sided 95 % normal quantile, the usual reading of "about two standard errors". */
const Z95 = 1.96;

function lowerFirst(s: string): string {
  return s.length ? s[0]!.toLowerCase() + s.slice(1) : s;
}

/** "wheat supply" for outputs, "nitrogen (N) use" for inputs. */
export function quantityPhrase(item: ReadingItem): string {
  return `${lowerFirst(item.name)} ${item.role === 'output' ? 'supply' : 'use'}`;
}

/** A size in words: "about 3 %", "about 0.4 %" (never more precise than the model deserves). */
export function sizeInWords(pct: number): string {
  const a = Math.abs(pct);
  if (a >= 0.95) return `about ${Math.round(a)} %`;
  return `about ${a.toFixed(1)} %`;
}

function joinWords(parts: string[]): string {
  if (parts.length <= 1) return parts.join('');
  return `${parts.slice(0, -1).join(', ')} and ${parts.at(-1)}`;
}

interface Effect {
  item: ReadingItem;
  pct: number;
  uncertain: boolean;
}

/** "lowers nitrogen (N) use by about 4 % and wheat supply by about 1 %": the verb is said once per run of the same direction. */
function effectClauses(effects: Effect[]): string {
  let lastVerb = '';
  const clauses = effects.map(({ item, pct }) => {
    if (Math.abs(pct) < NEGLIGIBLE_PCT) {
      lastVerb = '';
      return `leaves ${quantityPhrase(item)} practically unchanged`;
    }
    const verb = pct > 0 ? 'raises' : 'lowers';
    const text = `${verb === lastVerb ? '' : `${verb} `}${quantityPhrase(item)} by ${sizeInWords(pct)}`;
    lastVerb = verb;
    return text;
  });
  return joinWords(clauses);
}

/** Which quantities a sentence about one price mentions: its own, then the outputs, then the most affected input. */
function chosenEffects(j: number, items: ReadingItem[], e: number[][]): number[] {
  const chosen = [j];
  for (let i = 0; i < items.length; i++) if (i !== j && items[i]!.role === 'output') chosen.push(i);
  let strongest = -1;
  for (let i = 0; i < items.length; i++) {
    if (chosen.includes(i) || items[i]!.role !== 'input') continue;
    if (strongest < 0 || Math.abs(e[i]![j]!) > Math.abs(e[strongest]![j]!)) strongest = i;
  }
  if (strongest >= 0) chosen.push(strongest);
  return chosen.slice(0, 4);
}

/**
 * One sentence per price: what a 10 % rise in it does to its own quantity, to each output and to
 * the input it moves most, by the elasticities e[i][j] = ∂ln|y_i|/∂ln p_j (a 10 % rise changes
 * quantity i by about 10·e[i][j] %). Effects within two standard errors of zero are named as such.
 */
export function readElasticities(items: ReadingItem[], elasticities: number[][], standardErrors: number[][] | null): PlainReading[] {
  return items.map((priced, j) => {
    const effects: Effect[] = chosenEffects(j, items, elasticities).map((i) => {
      const e = elasticities[i]![j]!;
      const se = standardErrors?.[i]?.[j];
      return { item: items[i]!, pct: PRICE_RISE_PCT * e, uncertain: se !== undefined && Number.isFinite(se) && Math.abs(e) < Z95 * se };
    });
    let text = `In this model a ${PRICE_RISE_PCT} % rise in the price of ${lowerFirst(priced.name)} ${effectClauses(effects)}.`;
    const unclear = effects.filter((f) => f.uncertain && Math.abs(f.pct) >= NEGLIGIBLE_PCT).map((f) => quantityPhrase(f.item));
    if (unclear.length) {
      text += ` The effect on ${joinWords(unclear)} is too uncertain to tell apart from no change.`;
    }
    return { price: priced.code, text };
  });
}

export interface SampleDescription {
  firstSeason: string;
  lastSeason: string;
  observations: number;
}

/** The caution that goes with every reading: an estimate from past behaviour, not a promise or advice. */
export function readingCaution(sample: SampleDescription | null): string {
  const from = sample
    ? ` of the co-op's farms in ${sample.firstSeason} to ${sample.lastSeason} (${sample.observations} farm-seasons)`
    : '';
  return (
    `These are estimates from past behaviour${from}, read at the sample's average prices, land and trend, with every other price held where it was. ` +
    'They are not a forecast of what members will do: relationships change with policy, technology, weather and markets. ' +
    'Not financial advice; fertiliser rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.'
  );
}

export interface ShadowValueInput {
  factor: string;
  value: number;
  standardError: number;
}

function money(value: number, currency: string): string {
  try {
    return new Intl.NumberFormat('en', { style: 'currency', currency, maximumFractionDigits: 0 }).format(value);
  } catch {
    return `${Math.round(value).toLocaleString('en')} ${currency}`;
  }
}

/**
 * What one more unit of each fixed factor is worth (∂π/∂z) to a farm's season return over the
 * modelled variable inputs, in words, followed by what that return leaves out.
 */
export function readShadowValues(values: ShadowValueInput[], currency: string): string[] {
  if (!values.length) return [];
  const lines = values.map(({ factor, value, standardError }) => {
    const give = `give or take ${money(Z95 * standardError, currency)}`;
    const direction = value >= 0 ? 'adds' : 'takes';
    const amount = money(Math.abs(value), currency);
    if (factor === 'land_ha') {
      return `One more hectare of land ${direction} about ${amount} ${value >= 0 ? 'to' : 'from'} an average farm's season ${RETURN_NAME} at average prices (${give}).`;
    }
    if (factor === 'trend') {
      return `A season of technical change (the trend) ${direction} about ${amount} ${value >= 0 ? 'to' : 'from'} an average farm's ${RETURN_NAME} at unchanged prices and land (${give}).`;
    }
    return `One more unit of ${factor} ${direction} about ${amount} ${value >= 0 ? 'to' : 'from'} an average farm's season ${RETURN_NAME} (${give}).`;
  });
  return [...lines, RETURN_NOTE];
}

export interface BacktestInput {
  item: string;
  mape: number;
  bias: number;
}

/** The back-test in a few sentences: how far off the one-season-ahead projections were, and for what. */
export function readBacktest(items: ReadingItem[], results: BacktestInput[], seasons: number): string[] {
  const known = results.filter((r) => Number.isFinite(r.mape));
  if (seasons === 0 || known.length === 0) return [];
  const byCode = new Map(items.map((i) => [i.code, i]));
  const label = (code: string) => {
    const item = byCode.get(code);
    return item ? quantityPhrase(item) : code;
  };
  const pct = (v: number) => `${Math.abs(v) < 9.95 ? Math.abs(v).toFixed(1) : Math.round(Math.abs(v))} %`;
  const sorted = [...known].sort((a, b) => a.mape - b.mape);
  const best = sorted[0]!;
  const worst = sorted.at(-1)!;
  const average = known.reduce((s, r) => s + r.mape, 0) / known.length;
  const lines = [
    `Fitted each time on the seasons before, the model projected the co-op's totals of the last ${seasons === 1 ? 'season' : `${seasons} seasons`} ` +
      `${pct(average)} off on average across ${known.length === 1 ? 'the one item' : `the ${known.length} items`}.`,
  ];
  if (known.length > 1) {
    lines.push(`Closest: ${label(best.item)}, ${pct(best.mape)} off. Furthest: ${label(worst.item)}, ${pct(worst.mape)} off.`);
  }
  const leaning = known.filter((r) => Math.abs(r.bias) >= 0.5 && Math.abs(r.bias) >= 0.5 * r.mape);
  const clause = (verb: string, rs: BacktestInput[]) =>
    rs.length ? `${verb} ${joinWords(rs.map((r) => `${label(r.item)} by ${pct(r.bias)}`))}` : '';
  const leans = [clause('over-projects', leaning.filter((r) => r.bias > 0)), clause('under-projects', leaning.filter((r) => r.bias < 0))].filter(Boolean);
  if (leans.length) lines.push(`On average it ${leans.join(', and ')}.`);
  return lines;
}
