/**
 * Contracted deliveries: the words (docs/cost-duality.md). Blocking words say why a farm could not be
 * evaluated; the others say what to read with care (commitments beyond the farm's record, inputs the
 * technology would use less than none of, draws that could not be evaluated).
 */
import type { ContractedIssue } from '../../shared/contracted-types.js';
import type { SolveFailure } from './contracted-core.js';
import type { FarmHistory, FarmSetup } from './contracted-setup.js';

function fmt(v: number): string {
  const a = Math.abs(v);
  const digits = a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : 3;
  return v.toLocaleString('en-GB', { maximumFractionDigits: digits, minimumFractionDigits: 0 });
}

function fmtQty(q: number, unit: string | undefined): string {
  return unit ? `${fmt(q)} ${unit}` : fmt(q);
}

function unitPer(unit: string | undefined, perHa: boolean): string {
  if (!perHa) return unit ? `${unit} for the farm` : 'for the farm';
  return unit ? `${unit}/ha` : 'per hectare';
}

export function failureIssues(
  failure: SolveFailure,
  f: FarmSetup,
  names: string[],
  units: Record<string, string>,
  perHa: boolean,
  history: (FarmHistory | null)[],
): ContractedIssue[] {
  const others = f.committed.length > 1;
  return failure.items.map((c) => {
    const j = f.committed.indexOf(c);
    const item = names[c]!;
    const qty = `${fmtQty(f.quantity[j]!, units[item])} of ${item}${perHa ? ` (${fmt(f.target[j]!)} ${unitPer(units[item], true)})` : ''}`;
    const h = history[j];
    const given = others ? ', together with its other commitments' : '';
    if (failure.reason === 'out-of-reach' && failure.direction === 'low') {
      const hist = h && f.target[j]! < h.min ? ` It is also less ${item} ${perHa ? 'per hectare ' : ''}than the farm has grown in any of its ${h.seasons} recorded seasons (at least ${fmt(h.min)} ${unitPer(units[item], perHa)}).` : '';
      return {
        item,
        kind: 'out-of-reach' as const,
        blocking: true,
        text: `${qty} is out of reach for farm ${f.spec.farm} at positive prices: the fitted technology would grow more ${item} than that even at a price near zero${given}, so no marginal cost can be given.${hist}`,
      };
    }
    if (failure.reason === 'out-of-reach') {
      const hist = h && f.target[j]! > h.max ? ` That is more ${item} ${perHa ? 'per hectare ' : ''}than this farm has ever grown (at most ${fmt(h.max)} ${unitPer(units[item], perHa)} in ${h.seasons} recorded season${h.seasons === 1 ? '' : 's'}).` : '';
      return {
        item,
        kind: 'out-of-reach' as const,
        blocking: true,
        text: `${qty} is more than the fitted technology can supply on farm ${f.spec.farm} at any price${given}, so no marginal cost can be given.${hist}`,
      };
    }
    if (failure.reason === 'singular')
      return {
        item,
        kind: 'singular' as const,
        blocking: true,
        text: `The fitted supply of ${item} on farm ${f.spec.farm} does not respond to its own price${others ? ' independently of the other committed outputs' : ''} (the profit function is flat in that direction), so no price brings it to ${qty} and no marginal cost can be read from it.`,
      };
    return {
      item,
      kind: 'no-solution' as const,
      blocking: true,
      text: `The search for the price at which farm ${f.spec.farm} would supply ${qty} did not settle, so no marginal cost is given.`,
    };
  });
}

/** Words on commitments beyond the farm's own record (more, or less, than it has ever grown). */
export function historyIssues(f: FarmSetup, history: (FarmHistory | null)[], names: string[], units: Record<string, string>, perHa: boolean): ContractedIssue[] {
  const issues: ContractedIssue[] = [];
  f.committed.forEach((c, j) => {
    const h = history[j];
    if (!h) return;
    const t = f.target[j]!;
    const more = t > h.max * (1 + 1e-9);
    if (!more && !(t < h.min * (1 - 1e-9))) return;
    const item = names[c]!;
    const what = unitPer(units[item], perHa);
    issues.push({
      item,
      kind: 'beyond-history',
      blocking: false,
      text: `${fmtQty(f.quantity[j]!, units[item])} of ${item} is ${fmt(t)} ${what}: ${more ? 'more' : 'less'} ${item} ${perHa ? 'per hectare ' : ''}than farm ${f.spec.farm} has grown in any of its ${h.seasons} recorded season${h.seasons === 1 ? '' : 's'} (${more ? `at most ${fmt(h.max)}` : `at least ${fmt(h.min)}`} ${what}), so the figures extrapolate the fitted technology.`,
    });
  });
  return issues;
}

/** Words on inputs the technology would use less than none of at the committed tonnage (shown as zero). */
export function wrongSignIssues(f: FarmSetup, names: string[], roles: readonly string[], yStar: number[]): ContractedIssue[] {
  const issues: ContractedIssue[] = [];
  names.forEach((nm, i) => {
    if (roles[i] === 'input' && yStar[i]! > 0)
      issues.push({
        item: nm,
        kind: 'wrong-sign',
        blocking: false,
        text: `At the committed tonnage the fitted technology gives farm ${f.spec.farm} a negative use of ${nm} (${fmt(-f.land * yStar[i]!)}); it is shown as zero, and the other figures should be read with care.`,
      });
  });
  return issues;
}

/** Share of failed draws above which a farm gets a (non-blocking) word about its bands. */
const FAILED_DRAWS_WORTH_SAYING = 0.05;

/** A word on the draws that could not be evaluated, when they are more than FAILED_DRAWS_WORTH_SAYING of S; null otherwise. */
export function failedDrawsIssue(f: FarmSetup, names: string[], S: number, failed: number, belowZero: number, beyond: number): ContractedIssue | null {
  if (!(S > 0 && failed / S > FAILED_DRAWS_WORTH_SAYING)) return null;
  const what =
    beyond >= failed / 2
      ? 'the committed quantity is more than the technology of that draw can supply at any price'
      : belowZero >= failed / 2
        ? 'the committed quantity needs a price at or below zero'
        : 'the committed quantity could not be evaluated';
  return {
    item: names[f.committed[0]!]!,
    kind: 'out-of-reach',
    blocking: false,
    text: `In ${Math.round((100 * failed) / S)} % of the ${S} draws of the model's uncertainty ${what} on farm ${f.spec.farm}; the bands cover the other draws only, so read them with care.`,
  };
}
