/**
 * The back-test of a forecasting model in plain words, for the model page, the outlook page and the
 * publish warning alike (docs/forecasting.md §7): how much closer the model's farm projections came
 * than the two plain rules, and how often its bands held what happened.
 */
import type { BackTestItem, BackTestResult, CoverageCount } from './forecast-types.js';

export interface ItemSkill {
  item: string;
  name: string;
  /** Share by which the model's median farm error was below the per-hectare rule's (0.18 = 18 % closer; negative: further off). */
  vsPerHectare: number | null;
  vsLastSeason: number | null;
  /** True when the model was no worse than the per-hectare rule (or last season's figure without land). */
  beatsRule: boolean;
  farmCoverage: number | null;
  sentence: string;
}

export interface SkillSummary {
  /** The band's central probability (0.9). */
  level: number;
  /** Seasons projected in the back-test. */
  seasons: number;
  /** e.g. "this model's farm projections were 18 % closer than last season's figures and 6 % closer than …" */
  skill: string;
  /** e.g. "its 90 % bands held 88 % of farm outcomes (…by farm size…) and 9 of 10 co-op totals" */
  coverage: string;
  /** Both, as one paragraph. */
  text: string;
  items: ItemSkill[];
  /** Items for which the model did not beat the plain per-hectare rule, by name. */
  weakItems: { item: string; name: string; sentence: string }[];
  /** Totals over items. */
  farmCoverage: CoverageCount;
  coopCoverage: CoverageCount;
  byThird: [CoverageCount, CoverageCount, CoverageCount];
}

const pct = (x: number) => `${Math.round(x * 100)} %`;

function add(a: CoverageCount, b: CoverageCount): CoverageCount {
  const held = a.held + b.held;
  const total = a.total + b.total;
  return { held, total, share: total ? held / total : null };
}
const none = (): CoverageCount => ({ held: 0, total: 0, share: null });

function median(xs: number[]): number | null {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** "18 % closer than X" or "7 % further off than X" from a ratio model/rule of errors. */
export function closerWords(ratio: number | null, than: string): string | null {
  if (ratio === null || !Number.isFinite(ratio)) return null;
  const gain = 1 - ratio;
  if (Math.abs(gain) < 0.005) return `as close as ${than}`;
  return gain > 0 ? `${pct(gain)} closer than ${than}` : `${pct(-gain)} further off than ${than}`;
}

const LAST = 'last season’s figures';
const PER_HA = 'the farm’s own average per hectare times its land';

function itemSkill(it: BackTestItem, name: string, level: number): ItemSkill {
  const vsPerHectare = it.ratios.perHectare?.mdape ?? null;
  const vsLastSeason = it.ratios.lastSeason.mdape;
  const parts = [closerWords(vsLastSeason, LAST), closerWords(vsPerHectare, PER_HA)].filter((p): p is string => !!p);
  const cov = it.coverage.farms.share;
  const coverage = cov === null ? '' : `; its ${pct(level)} bands held ${pct(cov)} of farm outcomes`;
  const coop = it.coverage.coop.total ? ` and ${it.coverage.coop.held} of ${it.coverage.coop.total} co-op totals` : '';
  const sentence = parts.length ? `${name}: farm projections ${parts.join(' and ')}${coverage}${coop}.` : `${name}: too few farm outcomes to compare${coverage}${coop}.`;
  return {
    item: it.item,
    name,
    vsPerHectare: vsPerHectare === null ? null : 1 - vsPerHectare,
    vsLastSeason: vsLastSeason === null ? null : 1 - vsLastSeason,
    beatsRule: it.beatsRule,
    farmCoverage: cov,
    sentence,
  };
}

/** Off by more than this share, a band is called too wide or too narrow (about two binomial standard errors of 100 outcomes). */
const LOOSE = 0.07;

/** A sentence when the bands do not hold about their level for some farm size or for the co-op total. */
function fitWords(level: number, thirds: CoverageCount[], coop: CoverageCount): string {
  const names = ['small', 'middle-sized', 'large'];
  const narrow = thirds.flatMap((t, k) => (t.share !== null && t.share < level - LOOSE ? [names[k]!] : []));
  const wide = thirds.flatMap((t, k) => (t.share !== null && t.share > Math.min(0.995, level + LOOSE) ? [names[k]!] : []));
  const parts: string[] = [];
  if (narrow.length) parts.push(`too narrow for ${narrow.join(' and ')} farms`);
  if (wide.length) parts.push(`too wide for ${wide.join(' and ')} farms`);
  if (coop.share !== null && coop.total >= 5 && coop.share < level - 2 * LOOSE) parts.push('too narrow for the co-op total');
  return parts.length ? ` The bands were ${parts.join(', ')}.` : ` That is about as often as ${pct(level)} bands should hold.`;
}

/** The back-test in words; `nameOf` gives an item's name from its code. */
export function skillSummary(bt: BackTestResult, nameOf: (code: string) => string): SkillSummary {
  const level = bt.level;
  const items = bt.items.map((it) => itemSkill(it, nameOf(it.item), level));
  const farmCoverage = bt.items.reduce((a, it) => add(a, it.coverage.farms), none());
  const coopCoverage = bt.items.reduce((a, it) => add(a, it.coverage.coop), none());
  const byThird = [0, 1, 2].map((k) => bt.items.reduce((a, it) => add(a, it.coverage.byThird[k]!), none())) as [CoverageCount, CoverageCount, CoverageCount];
  const mLast = median(bt.items.map((it) => it.ratios.lastSeason.mdape).filter((r): r is number => r !== null));
  const mHa = median(bt.items.map((it) => it.ratios.perHectare?.mdape ?? null).filter((r): r is number => r !== null));
  const parts = [closerWords(mLast, LAST), closerWords(mHa, PER_HA)].filter((p): p is string => !!p);
  const seasons = bt.origins.filter((o) => !o.error).length;
  const skill = parts.length
    ? `Projecting each of the last ${seasons} seasons from the seasons before it, this model’s farm projections were ${parts.join(' and ')} (the middle item’s median farm error).`
    : `The back-test had too few farm outcomes to compare the model with plain rules.`;
  const thirdWords =
    bt.thirds.by === 'land' && byThird.every((t) => t.share !== null)
      ? ` (smallest third of farms ${pct(byThird[0].share!)}, middle third ${pct(byThird[1].share!)}, largest third ${pct(byThird[2].share!)})`
      : '';
  const coverage =
    farmCoverage.share === null
      ? ''
      : `Its ${pct(level)} bands held ${pct(farmCoverage.share)} of farm outcomes${thirdWords} and ${coopCoverage.held} of ${coopCoverage.total} co-op totals.${fitWords(level, byThird, coopCoverage)}`;
  // The pooled model's bands are not the per-hectare model's: say what they cover (docs/forecasting.md §7).
  const pooledWords =
    bt.spec === 'pooled' && farmCoverage.share !== null
      ? ' These are the pooled model’s bands: they allow for the uncertainty of its estimates and each farm’s own ups and downs, with one spread for every farm size, but not for a good or bad season that moves every farm together, so its co-op bands are likely too narrow.'
      : '';
  const weakItems = items
    .filter((i) => !i.beatsRule)
    .map((i) => {
      const it = bt.items.find((x) => x.item === i.item)!;
      const rule = it.rules.perHectare ?? it.rules.lastSeason;
      const ruleName = it.rules.perHectare ? 'the plain per-hectare rule (the farm’s own average per hectare times its land)' : 'last season’s figures';
      const errs = it.model.mdape !== null && rule.mdape !== null ? ` (median farm error ${it.model.mdape.toFixed(1)} % against ${rule.mdape.toFixed(1)} %)` : '';
      return { item: i.item, name: i.name, sentence: `For ${i.name} the model did not beat ${ruleName}${errs}.` };
    });
  return { level, seasons, skill, coverage: coverage + pooledWords, text: [skill, coverage + pooledWords].filter(Boolean).join(' '), items, weakItems, farmCoverage, coopCoverage, byThird };
}
