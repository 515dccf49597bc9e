/**
 * Expected prices for the coming season (docs/forecasting.md §1), one method per item, each with its
 * history of past errors so the planner can compare methods and size the low/high band:
 *   last season        p^e_t = p_{t−1}
 *   moving average     p^e_t = (1/k) Σ_{j=1..k} p_{t−j}   ("Olympic": the highest and lowest of the k dropped)
 *   linear trend       least-squares line of price on season year over the last n seasons, at year t
 *   adaptive (Nerlove) p^e_t = p^e_{t−1} + λ (p_{t−1} − p^e_{t−1}), started at the first price
 *   futures + basis    p^e_t = F_t + mean_{last n seasons s} (cash_s − F_s)      (Gardner 1976)
 *   manual             the planner's figure
 * Pure functions: prices in, numbers and plain-language explanations out.
 */
import { minus, priceText } from '../../shared/number-format.js';
import { linearRegression, linearRegressionLine } from 'simple-statistics';

import type { BandRule, ComputedExpectation, ErrorHistory, ExpectationMethod, ExpectationSetting, PastError, ScenarioRule } from '../../shared/outlook-types.js';

export type { BandRule, ComputedExpectation, ErrorHistory, ExpectationMethod, ExpectationSetting, PastError, ScenarioRule } from '../../shared/outlook-types.js';

/** One season's price: the co-op mean cash price (all delivery points and dates). */
export interface PricePoint {
  season: string;
  year: number;
  price: number;
}

export interface FuturesQuoteLite {
  contract: string;
  quote: number;
  quotedOn: string;
}

/** Quotes per season year, sorted by date (oldest first). */
export type FuturesBySeason = Map<number, { season: string; quotes: FuturesQuoteLite[] }>;

export interface ExpectationData {
  /** Seasons before the target with a price, oldest first. */
  history: PricePoint[];
  target: { season: string; year: number };
  futures: FuturesBySeason;
  /** For explanations, e.g. "EUR/t". */
  priceUnit: string;
}

export interface MethodValue {
  value: number;
  /** What the value is made of, in words with the numbers. */
  explanation: string;
  inputs: Record<string, unknown>;
}

/** A method cannot be applied to the data (too short a history, no futures quote, ...). */
export class ExpectationError extends Error {
  constructor(
    message: string,
    /** Which part of the setting the problem is in. */
    readonly field: 'method' | 'band' = 'method',
  ) {
    super(message);
    this.name = 'ExpectationError';
  }
}

/** How many past seasons the error history covers (the most recent ones the method can reach). */
export const ERROR_WINDOW = 10;
/** Fewest past errors that may size a band. */
export const MIN_ERRORS_FOR_BAND = 3;

// Numbers in the explanations read as the screens show them (src/app/outlook/outlook-format.ts
// formatPrice, formatPercent): the same Intl formatter and digits rule. Intl rounds the shortest
// decimal form of a number half away from zero (1.3215 → 1.322), where toFixed rounds the binary
// value (1.32149999… → 1.321), so the two used to disagree on the same price.
const nf1 = new Intl.NumberFormat('en-GB', { minimumFractionDigits: 1, maximumFractionDigits: 1 });

/** A price: two decimals from 10 up (195.40), three below (1.152), grouped in thousands (1,234.50). */
export const fmtPrice = priceText;
/** A percentage already in percent units, one decimal: "19.1 %". */
export function fmtPct(x: number): string {
  return `${minus(nf1.format(x))} %`;
}
const span = (pts: { season: string }[]) => (pts.length === 1 ? pts[0]!.season : `${pts[0]!.season}–${pts.at(-1)!.season}`);

export function methodLabel(m: ExpectationMethod): string {
  switch (m.kind) {
    case 'last':
      return "Last season's price";
    case 'moving-average':
      return `${m.olympic ? 'Olympic average' : 'Moving average'} of ${m.k} seasons`;
    case 'trend':
      return `Linear trend over ${m.seasons} seasons`;
    case 'adaptive':
      return `Adaptive expectation, λ = ${m.lambda}`;
    case 'futures-basis':
      return `Futures quote plus local basis (${m.basisSeasons} seasons)`;
    case 'manual':
      return 'Manual figure';
  }
}

/** Basis (cash − latest futures quote) of each season before `beforeYear` that has both, newest last. */
function basisHistory(history: PricePoint[], futures: FuturesBySeason, beforeYear: number, contract: string | null | undefined) {
  const out: { season: string; year: number; cash: number; futures: number; basis: number; quotedOn: string }[] = [];
  for (const p of history) {
    if (p.year >= beforeYear) continue;
    const quotes = pickQuotes(futures.get(p.year)?.quotes ?? [], contract);
    const last = quotes.at(-1);
    if (!last) continue;
    out.push({ season: p.season, year: p.year, cash: p.price, futures: last.quote, basis: p.price - last.quote, quotedOn: last.quotedOn });
  }
  return out;
}

function pickQuotes(quotes: FuturesQuoteLite[], contract: string | null | undefined) {
  return contract ? quotes.filter((q) => q.contract === contract) : quotes;
}

/**
 * The method's expectation for `target` from the prices before it. `forecastQuote` picks which of
 * the target season's futures quotes stands for "the quote at outlook time": the latest for the
 * coming season (the newest information), the earliest for a past season in the error history.
 */
export function expectationAt(
  method: ExpectationMethod,
  history: PricePoint[],
  target: { season: string; year: number },
  futures: FuturesBySeason,
  priceUnit: string,
  forecastQuote: 'latest' | 'earliest' = 'latest',
): MethodValue {
  const past = history.filter((p) => p.year < target.year);
  const need = (n: number, what: string) => {
    if (past.length < n) throw new ExpectationError(`${what} needs prices of at least ${n} earlier season${n > 1 ? 's' : ''}; ${past.length} found before ${target.season}`);
  };
  switch (method.kind) {
    case 'last': {
      need(1, "Last season's price");
      const p = past.at(-1)!;
      return {
        value: p.price,
        explanation: `The price of ${p.season}${p.year === target.year - 1 ? ', last season' : ', the latest season with a price'}: ${fmtPrice(p.price)} ${priceUnit}.`,
        inputs: { seasons: [p.season], prices: [p.price] },
      };
    }
    case 'moving-average': {
      need(method.k, 'This moving average');
      const pts = past.slice(-method.k);
      let used = pts.map((p) => p.price);
      let dropped = '';
      if (method.olympic) {
        if (pts.length < 3) throw new ExpectationError('An Olympic average needs at least 3 seasons');
        const sorted = [...used].sort((a, b) => a - b);
        const lo = sorted[0]!;
        const hi = sorted.at(-1)!;
        const copy = [...used];
        copy.splice(copy.indexOf(lo), 1);
        copy.splice(copy.indexOf(hi), 1);
        used = copy;
        dropped = ` without the lowest (${fmtPrice(lo)}) and the highest (${fmtPrice(hi)})`;
      }
      const value = used.reduce((a, b) => a + b, 0) / used.length;
      return {
        value,
        explanation: `The average of the ${pts.length} seasons ${span(pts)} (${pts.map((p) => fmtPrice(p.price)).join(', ')})${dropped}: ${fmtPrice(value)} ${priceUnit}.`,
        inputs: { seasons: pts.map((p) => p.season), prices: pts.map((p) => p.price), olympic: !!method.olympic },
      };
    }
    case 'trend': {
      need(3, 'A linear trend');
      const pts = past.slice(-method.seasons);
      const fit = linearRegression(pts.map((p) => [p.year, p.price]));
      const value = linearRegressionLine(fit)(target.year);
      if (!(value > 0)) throw new ExpectationError(`The trend line through ${span(pts)} reaches ${fmtPrice(value)} in ${target.season}; a price must be above 0`);
      const sign = fit.m >= 0 ? '+' : '−';
      return {
        value,
        explanation: `A straight line fitted by least squares to the prices of the ${pts.length} seasons ${span(pts)} (${sign}${fmtPrice(Math.abs(fit.m))} ${priceUnit} a season), extended to ${target.season}: ${fmtPrice(value)} ${priceUnit}.`,
        inputs: { seasons: pts.map((p) => p.season), prices: pts.map((p) => p.price), slope: fit.m, intercept: fit.b },
      };
    }
    case 'adaptive': {
      need(1, 'An adaptive expectation');
      const lambda = method.lambda;
      // The expectation for the second season is the first price; then each season's expectation
      // moves λ of the way to the price seen, so after the loop `value` is the one for the target.
      let value = past[0]!.price;
      for (let j = 1; j < past.length; j++) value = value + lambda * (past[j]!.price - value);
      return {
        value,
        explanation: `Adaptive expectation with weight λ = ${lambda}: each season the expectation moves ${lambda === 1 ? 'all the way' : `${Math.round(lambda * 100)} % of the way`} from the previous expectation to the price seen, starting at the ${past[0]!.season} price (${fmtPrice(past[0]!.price)}), over ${past.length} seasons to ${past.at(-1)!.season}: ${fmtPrice(value)} ${priceUnit}.`,
        inputs: { seasons: past.map((p) => p.season), prices: past.map((p) => p.price), lambda },
      };
    }
    case 'futures-basis': {
      const quotes = pickQuotes(futures.get(target.year)?.quotes ?? [], method.contract);
      const q = forecastQuote === 'latest' ? quotes.at(-1) : quotes[0];
      if (!q) throw new ExpectationError(`No futures quote is recorded for ${target.season}${method.contract ? ` (contract "${method.contract}")` : ''}`);
      const bases = basisHistory(past, futures, target.year, method.contract).slice(-method.basisSeasons);
      if (!bases.length) throw new ExpectationError(`The basis needs an earlier season with both a cash price and a futures quote${method.contract ? ` for "${method.contract}"` : ''}; none found before ${target.season}`);
      const basis = bases.reduce((a, b) => a + b.basis, 0) / bases.length;
      const value = q.quote + basis;
      if (!(value > 0)) throw new ExpectationError(`Futures ${fmtPrice(q.quote)} plus basis ${fmtPrice(basis)} is not above 0`);
      const sign = basis >= 0 ? '+' : '−';
      return {
        value,
        explanation: `The futures quote "${q.contract}" of ${fmtPrice(q.quote)} ${priceUnit} (quoted on ${q.quotedOn}) ${sign} a local basis of ${fmtPrice(Math.abs(basis))} ${priceUnit}, the mean of local cash minus futures over ${bases.length} season${bases.length > 1 ? 's' : ''} ${span(bases)}: ${fmtPrice(value)} ${priceUnit}.`,
        inputs: { futures: q, basis, basisSeasons: bases },
      };
    }
    case 'manual':
      return { value: method.value, explanation: `A figure set by the planner: ${fmtPrice(method.value)} ${priceUnit}.`, inputs: {} };
  }
}

/**
 * How the method would have done: for each of the last ERROR_WINDOW seasons it can reach, the
 * expectation formed from the seasons before it against the price that came.
 */
export function errorHistory(method: ExpectationMethod, history: PricePoint[], futures: FuturesBySeason, priceUnit: string): ErrorHistory {
  if (method.kind === 'manual') return { seasons: [], rmsPct: null, meanPct: null };
  const seasons: PastError[] = [];
  for (let j = history.length - 1; j >= 1 && seasons.length < ERROR_WINDOW; j--) {
    const target = history[j]!;
    try {
      const { value } = expectationAt(method, history.slice(0, j), target, futures, priceUnit, 'earliest');
      seasons.unshift({ season: target.season, expected: value, actual: target.price, errorPct: (100 * (target.price - value)) / value });
    } catch (err) {
      if (!(err instanceof ExpectationError)) throw err;
    }
  }
  if (!seasons.length) return { seasons, rmsPct: null, meanPct: null };
  const rmsPct = Math.sqrt(seasons.reduce((a, s) => a + s.errorPct ** 2, 0) / seasons.length);
  const meanPct = seasons.reduce((a, s) => a + s.errorPct, 0) / seasons.length;
  return { seasons, rmsPct, meanPct };
}

export interface Band {
  low: number;
  high: number;
  explanation: string;
}

/** Low and high around the base: base·(1 ∓ k·σ) with σ the method's RMS error, a ± percent, or the planner's figures. */
export function bandAround(base: number, rule: BandRule, errors: ErrorHistory, priceUnit: string, methodIsManual: boolean): Band {
  if (rule.kind === 'manual') {
    if (!(rule.low <= base && base <= rule.high)) throw new ExpectationError(`Low (${fmtPrice(rule.low)}) ≤ base (${fmtPrice(base)}) ≤ high (${fmtPrice(rule.high)}) must hold`, 'band');
    return { low: rule.low, high: rule.high, explanation: `Low and high set by the planner: ${fmtPrice(rule.low)} and ${fmtPrice(rule.high)} ${priceUnit}.` };
  }
  let share: number;
  let why: string;
  if (rule.kind === 'percent') {
    share = rule.pct / 100;
    why = `± ${rule.pct} % chosen by the planner`;
  } else {
    if (methodIsManual) throw new ExpectationError('A manual figure has no history of errors; choose a percent band or set low and high', 'band');
    if (errors.rmsPct === null || errors.seasons.length < MIN_ERRORS_FOR_BAND)
      throw new ExpectationError(
        `Only ${errors.seasons.length} past season${errors.seasons.length === 1 ? '' : 's'} to measure this method's errors (at least ${MIN_ERRORS_FOR_BAND} are needed); choose a percent band`,
        'band',
      );
    share = (rule.k * errors.rmsPct) / 100;
    why = `base × (1 ∓ ${rule.k} × ${fmtPct(errors.rmsPct)}), where ${fmtPct(errors.rmsPct)} is the root mean square error of this method over the ${errors.seasons.length} seasons ${span(errors.seasons)}`;
  }
  if (share >= 1) throw new ExpectationError(`A band of ± ${fmtPct(share * 100)} would put the low price at or below 0; choose a smaller one`, 'band');
  const low = base * (1 - share);
  const high = base * (1 + share);
  return { low, high, explanation: `Low ${fmtPrice(low)} and high ${fmtPrice(high)} ${priceUnit}: ${why}.` };
}

export function defaultBand(method: ExpectationMethod): BandRule {
  return method.kind === 'manual' ? { kind: 'percent', pct: 10 } : { kind: 'errors', k: 1 };
}

/** The expectation, its error history and its band for one item. */
export function computeExpectation(setting: ExpectationSetting, data: ExpectationData): ComputedExpectation {
  const band = setting.band ?? defaultBand(setting.method);
  const at = expectationAt(setting.method, data.history, data.target, data.futures, data.priceUnit, 'latest');
  const errors = errorHistory(setting.method, data.history, data.futures, data.priceUnit);
  const b = bandAround(at.value, band, errors, data.priceUnit, setting.method.kind === 'manual');
  const bias =
    errors.meanPct !== null && errors.seasons.length
      ? ` Over ${span(errors.seasons)} prices came out on average ${fmtPct(Math.abs(errors.meanPct))} ${errors.meanPct >= 0 ? 'above' : 'below'} what this method expected.`
      : '';
  return {
    item: setting.item,
    method: setting.method,
    methodLabel: methodLabel(setting.method),
    band,
    base: at.value,
    low: b.low,
    high: b.high,
    priceUnit: data.priceUnit,
    explanation: `${at.explanation} ${b.explanation}${bias}`,
    note: setting.note ?? '',
    inputs: at.inputs,
    errors,
  };
}

/**
 * The three price scenarios. `margin`: low = outputs at their low and inputs at their high price (the
 * squeeze), high = the reverse. `uniform`: every item at its low (high) price. Because the profit
 * function is homogeneous of degree zero in prices, moving all prices by the same share changes
 * nothing; only relative prices move quantities.
 */
export function scenarioPrices(expectations: { item: string; role: 'output' | 'input'; base: number; low: number; high: number }[], rule: ScenarioRule) {
  const pick = (which: 'low' | 'high') =>
    Object.fromEntries(
      expectations.map((e) => {
        const side = rule === 'uniform' || e.role === 'output' ? which : which === 'low' ? 'high' : 'low';
        return [e.item, e[side]];
      }),
    );
  return [
    { name: 'low', prices: pick('low') },
    { name: 'base', prices: Object.fromEntries(expectations.map((e) => [e.item, e.base])) },
    { name: 'high', prices: pick('high') },
  ];
}

export const SCENARIO_RULE_TEXT: Record<ScenarioRule, string> = {
  margin: 'Low: outputs at their low and inputs at their high expected price (a margin squeeze). High: outputs at their high and inputs at their low price.',
  uniform: 'Low: every item at its low expected price. High: every item at its high expected price. Only relative prices move the projected quantities.',
};
