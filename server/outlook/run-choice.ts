/**
 * Which finished model run an outlook should rest on: the one its back-test favours, not the newest
 * (docs/forecasting.md §7). Runs are ranked by how many items their farm projections beat the plain
 * per-hectare rule for, then by how much closer than that rule they came (the middle item), then by
 * how near their bands' coverage lies to the stated level, then the newest; a run that breaks
 * convexity or has no back-test comes after every run that has one.
 */
import type { Db } from '../db/client.js';
import { itemCodesAndNames, succeededRunsWithSkill } from './outlook-repository.js';
import { SPEC_WORDS, type ForecastSpecName } from '../../shared/model-schemas.js';
import type { BackTestResult } from '../../shared/forecast-types.js';
import { closerWords, skillSummary, type SkillSummary } from '../../shared/skill-words.js';

export interface RunSkill {
  runId: number;
  modelId: number;
  modelName: string;
  spec: ForecastSpecName;
  specLabel: string;
  finishedAt: Date | null;
  convex: boolean;
  /** Null when the run has no back-test of its forecasting model. */
  summary: SkillSummary | null;
  itemsBeatingRule: number;
  itemCount: number;
  /** Middle item's model error over the per-hectare rule's (below 1: closer). */
  medianRatio: number | null;
}

export interface RunChoice {
  favoured: { runId: number; reason: string } | null;
  runs: RunSkill[];
}

function median(xs: number[]): number | null {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** Item code → name, for the words. */
export async function itemNames(db: Db): Promise<(code: string) => string> {
  const rows = await itemCodesAndNames(db);
  const map = new Map(rows.map((r) => [r.code, r.name]));
  return (code) => map.get(code) ?? code;
}

/** The back-test of one run in words (null when it has none). */
export function runSkillOf(skill: BackTestResult | null | undefined, nameOf: (code: string) => string): SkillSummary | null {
  return skill && skill.items?.length ? skillSummary(skill, nameOf) : null;
}

function score(r: RunSkill): number[] {
  // Smaller sorts first.
  return [
    r.summary ? 0 : 1,
    r.convex ? 0 : 1,
    r.itemCount ? -(r.itemsBeatingRule / r.itemCount) : 0,
    r.medianRatio ?? Infinity,
    r.summary?.farmCoverage.share !== null && r.summary?.farmCoverage.share !== undefined ? Math.abs(r.summary.farmCoverage.share - r.summary.level) : Infinity,
    -r.runId,
  ];
}

function compare(a: RunSkill, b: RunSkill): number {
  const sa = score(a);
  const sb = score(b);
  for (let i = 0; i < sa.length; i++) if (sa[i] !== sb[i]) return sa[i]! < sb[i]! ? -1 : 1;
  return 0;
}

function reasonFor(best: RunSkill, next: RunSkill | undefined): string {
  const name = `Run #${best.runId} of “${best.modelName}” (${best.specLabel.toLowerCase()})`;
  if (!best.summary) return `${name} is the newest finished run; no run has a back-test of its forecasts yet, so none can be favoured on skill.`;
  const closer = closerWords(best.medianRatio, 'that rule');
  const cov = best.summary.farmCoverage.share;
  const parts = [
    `it beat the plain per-hectare rule for ${best.itemsBeatingRule} of ${best.itemCount} items`,
    closer ? `its farm projections came ${closer} on the middle item` : null,
    cov !== null ? `its ${Math.round(best.summary.level * 100)} % bands held ${Math.round(cov * 100)} % of farm outcomes` : null,
  ].filter(Boolean);
  let text = `${name} is favoured by its back-test: ${parts.join('; ')}.`;
  if (!best.convex) text += ' It breaks convexity, as every finished run does; read its bands with care.';
  if (next) {
    const why = !next.summary
      ? 'has no back-test of its forecasts'
      : !next.convex && best.convex
        ? 'breaks convexity'
        : next.itemsBeatingRule < best.itemsBeatingRule
          ? `beat the rule for ${next.itemsBeatingRule} of ${next.itemCount} items`
          : 'came less close to what happened';
    text += ` The next best, run #${next.runId} of “${next.modelName}”, ${why}.`;
  }
  return text;
}

/** Every finished run with its back-test in words, and the one the back-test favours. */
export async function runChoice(db: Db, runIds?: number[]): Promise<RunChoice> {
  const rows = await succeededRunsWithSkill(db, runIds);
  const nameOf = await itemNames(db);
  const runs: RunSkill[] = rows.map((r) => {
    const spec = r.spec ?? 'pooled';
    const skill = typeof r.skill === 'string' ? (JSON.parse(r.skill) as BackTestResult) : r.skill;
    const summary = runSkillOf(skill, nameOf);
    const ratios = (skill?.items ?? []).map((it) => it.ratios.perHectare?.mdape ?? it.ratios.lastSeason.mdape).filter((x): x is number => x !== null && Number.isFinite(x));
    return {
      runId: r.runId,
      modelId: r.modelId,
      modelName: r.modelName,
      spec,
      specLabel: SPEC_WORDS[spec].label,
      finishedAt: r.finishedAt,
      convex: r.convex !== false,
      summary,
      itemsBeatingRule: summary ? summary.items.filter((i) => i.beatsRule).length : 0,
      itemCount: summary?.items.length ?? 0,
      medianRatio: median(ratios),
    };
  });
  const ranked = [...runs].sort(compare);
  const best = ranked[0];
  return { favoured: best ? { runId: best.runId, reason: reasonFor(best, ranked[1]) } : null, runs };
}

/** What the pages read of a run's back-test (the words, not the figures behind them). */
export function skillView(r: RunSkill) {
  return {
    runId: r.runId,
    modelId: r.modelId,
    modelName: r.modelName,
    spec: r.spec,
    specLabel: r.specLabel,
    hasBacktest: r.summary !== null,
    text: r.summary?.text ?? 'This run has no back-test of its forecasts; run the model again to get one.',
    items: r.summary?.items.map((i) => ({ item: i.item, name: i.name, sentence: i.sentence, beatsRule: i.beatsRule })) ?? [],
    weakItems: r.summary?.weakItems ?? [],
    itemsBeatingRule: r.itemsBeatingRule,
    itemCount: r.itemCount,
  };
}

/** `GET /api/outlooks/run-choice`. */
export async function runChoiceView(db: Db) {
  const c = await runChoice(db);
  return { favoured: c.favoured, runs: c.runs.map(skillView) };
}

/** The back-test in words of one run (null when the run is missing or has not succeeded). */
export async function skillOfRun(db: Db, runId: number | null) {
  if (!runId) return null;
  const [r] = (await runChoice(db, [runId])).runs;
  return r ? skillView(r) : null;
}
