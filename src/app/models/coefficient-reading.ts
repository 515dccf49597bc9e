import type { CoefficientEstimate, EquationFit } from '../../../shared/estimation-types';
import { factorLabel, type ItemLabels } from './model-format';

/** Two standard errors either side: the usual 95 % range under a normal approximation. */
export const RANGE_Z = 1.96;

/** One coefficient as the coefficient page shows it: what it measures, in the sign of the quantity shown. */
export interface CoefficientLine {
  /** What the coefficient measures, in plain words. */
  meaning: string;
  /** The estimate turned to the quantity shown (supply for outputs, use for inputs). */
  value: number;
  low: number;
  high: number;
  standardError: number;
  /** "clearly above zero", "clearly below zero" or "could be zero". */
  verdict: 'above' | 'below' | 'unclear';
  /** The structural parameter, and the other equations that share it through symmetry. */
  parameter: string;
  sharedWith: string[];
  /** The engine's own names, for the export. */
  raw: CoefficientEstimate;
}

export interface EquationReading {
  item: string;
  role: 'output' | 'input';
  /** "Wheat supply" or "Nitrogen (N) use". */
  title: string;
  unit: string;
  r2: number;
  rmse: number;
  lines: CoefficientLine[];
}

/**
 * What a column of a netput equation measures. The engine names its columns the way its equations
 * are written (a constant, normalised prices p_x, square-root price ratios s_x, fixed factors, and
 * their squares hz_/hp_); the page says what each one means for the quantity.
 */
export function coefficientMeaning(column: string, equationItem: string, form: string, labels: ItemLabels, factors: readonly string[] = [], perHectare = false): string {
  const lower = (name: string) => (/^[A-Z][a-z]/.test(name) ? name[0]!.toLowerCase() + name.slice(1) : name);
  const price = (code: string) => (code === equationItem ? 'its own price' : `the ${lower(labels.name(code))} price`);
  const factor = (f: string) => (f === 'land_ha' ? 'land' : factorLabel(f).toLowerCase());
  if (column === '(Intercept)') {
    if (perHectare) return form === 'generalized-leontief' ? 'Base level per hectare, before other prices' : 'Base level per hectare, before prices and trend';
    return form === 'generalized-leontief' ? 'Base level per unit of fixed factor, before other prices' : 'Base level, before prices, land and trend';
  }
  let m: RegExpExecArray | null;
  if ((m = /^p_(.+)$/.exec(column))) return `Response to ${price(m[1]!)}`;
  if ((m = /^s_(.+)$/.exec(column))) return `Response to ${price(m[1]!)} relative to its own`;
  if (column === 'land_ha') return 'Change per extra hectare of land';
  if (column === 'trend') return perHectare ? 'Drift per hectare from one season to the next' : 'Drift from one season to the next';
  if ((m = /^hz_(.+)$/.exec(column))) {
    const rest = m[1]!;
    const first = factors.find((f) => rest.startsWith(`${f}_`) && factors.includes(rest.slice(f.length + 1)));
    return first ? `Joint effect of ${factor(first)} and ${factor(rest.slice(first.length + 1))}` : `Bend in the response to ${factor(rest)}`;
  }
  if ((m = /^hp_(.+)$/.exec(column))) return `Bend in the response to ${price(m[1]!)}`;
  return perHectare ? `Change per unit of ${factor(column)} per hectare` : `Change per unit of ${factor(column)}`;
}

/**
 * Every equation of a fit, read for the coefficient page. Input equations are turned to use (the
 * engine counts inputs negative). `perHectare`: the fit is the per-hectare profit function of a
 * forecasting model (every netput and other fixed factor per hectare of land), and the words and
 * units say so.
 */
export function readEquations(equations: readonly EquationFit[], form: string, labels: ItemLabels, factors: readonly string[] = [], perHectare = false): EquationReading[] {
  const owners = new Map<string, string[]>();
  for (const e of equations) for (const c of e.coefficients) owners.set(c.parameter, [...(owners.get(c.parameter) ?? []), e.item]);
  return equations.map((e) => {
    const sign = e.role === 'input' ? -1 : 1;
    const name = labels.name(e.item);
    return {
      item: e.item,
      role: e.role,
      title: `${name} ${e.role === 'output' ? 'supply' : 'use'}`,
      unit: perHectare && labels.unit(e.item) ? `${labels.unit(e.item)} per ha` : labels.unit(e.item),
      r2: e.r2,
      rmse: e.rmse,
      lines: e.coefficients.map((c) => {
        const value = sign * c.estimate;
        const low = value - RANGE_Z * c.standardError;
        const high = value + RANGE_Z * c.standardError;
        const column = c.name.startsWith(`${e.item}_`) ? c.name.slice(e.item.length + 1) : c.name;
        return {
          meaning: coefficientMeaning(column, e.item, form, labels, factors, perHectare),
          value,
          low,
          high,
          standardError: c.standardError,
          verdict: low > 0 ? 'above' : high < 0 ? 'below' : 'unclear',
          parameter: c.parameter,
          sharedWith: (owners.get(c.parameter) ?? [])
            .filter((item) => item !== e.item)
            .map((item) => {
              const other = equations.find((x) => x.item === item);
              return `${labels.name(item)} ${other?.role === 'input' ? 'use' : 'supply'}`;
            }),
          raw: c,
        } satisfies CoefficientLine;
      }),
    };
  });
}
