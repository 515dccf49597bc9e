/**
 * Home's summary: what the co-op holds, and what the signed-in person could do next, per role —
 * records missing for a season, no model fitted since the data changed, an outlook drafted but not
 * published, a published outlook with no budget. Members read their next steps on their own Home.
 */
import type { CoopSummary, NextStep } from '../../shared/api-types.js';
import { ACCESS, type Role } from '../../shared/roles.js';
import { modelDefinitionSchema } from '../../shared/model-schemas.js';
import { dayText } from '../../shared/number-format.js';
import type { Db } from '../db/client.js';
import { getSettings } from '../settings/settings-service.js';
import { buildDataset, hashOf } from '../models/model-data.js';
import { draftInputsHash } from '../outlook/projection-service.js';
import { demoSetupState } from '../../seed/prepare-demo.js';
import * as repo from './summary-repository.js';

type Seasons = Awaited<ReturnType<typeof repo.seasonsInOrder>>;

/** Seasons with some farm missing up to the newest recorded one, and the opened seasons after it. */
export function recordCoverage(seasonRows: Seasons, withRecords: Map<number, number>, farmCount: number) {
  const lastRecorded = seasonRows.reduce((last, s, i) => (withRecords.has(s.id) ? i : last), -1);
  // Seasons after the newest one with any record have not been recorded yet: not gaps, but said so.
  const gaps = seasonRows
    .slice(0, lastRecorded + 1)
    .map((s) => ({ season: s.label, farmsMissing: farmCount - (withRecords.get(s.id) ?? 0) }))
    .filter((g) => g.farmsMissing > 0)
    .reverse();
  return { gaps, lastRecorded: lastRecorded >= 0 ? seasonRows[lastRecorded]!.label : null, unrecorded: seasonRows.slice(lastRecorded + 1).map((s) => s.label) };
}

/** Whether the data a run was fitted on differs from what the data desk holds now (null: cannot tell). */
async function dataChangedSince(db: Db, run: { definition: unknown; dataHash: string }): Promise<boolean | null> {
  try {
    const { dataset } = await buildDataset(db, modelDefinitionSchema.parse(run.definition));
    return hashOf(dataset) !== run.dataHash;
  } catch {
    return null;
  }
}

/** Who is shown the missing-records steps: those who may open the imports page they link to. */
const PLANNING: readonly Role[] = ACCESS.imports;

async function nextSteps(db: Db, role: Role, facts: { farms: number; members: number; prices: number; coverage: ReturnType<typeof recordCoverage> }): Promise<NextStep[]> {
  const steps: NextStep[] = [];
  const farmsLink = { path: '/farms', label: 'Open farms' };
  if (role === 'admin' && facts.members === 0)
    steps.push({ kind: 'invite-members', icon: 'person_add', text: 'No member has an account yet. Invite the members so they can read their own figures.', link: { path: '/admin/users', label: 'Invite people' } });
  if (facts.farms === 0) steps.push({ kind: 'no-farms', icon: 'agriculture', text: 'No farms are registered yet; models need farms with records.' });
  if (facts.prices === 0)
    steps.push({ kind: 'no-prices', icon: 'price_change', text: 'No price history is stored yet. Every output and input needs prices before a model can be fitted.', link: { path: '/prices', label: 'Open prices' } });

  const outlooks = await repo.outlookStates(db);
  const outlookSeasons = new Set(outlooks.map((o) => o.season));
  if (PLANNING.includes(role) && facts.farms > 0) {
    // A season opened (for an outlook) after the newest recorded one: its records come after harvest.
    for (const season of facts.coverage.unrecorded.slice(0, 2)) {
      const why = outlookSeasons.has(season) ? ` It is the season of an outlook: when its harvest is in, import the records so the forecast can be set against what happened.` : '';
      steps.push({ kind: 'records-missing', icon: 'event_busy', text: `No farm has records for ${season} yet; the newest recorded season is ${facts.coverage.lastRecorded ?? 'none'}.${why}`, link: { path: '/imports', label: 'Import records' } });
    }
    for (const gap of facts.coverage.gaps.slice(0, 3)) {
      const farms = gap.farmsMissing === 1 ? '1 farm has' : `${gap.farmsMissing} farms have`;
      steps.push({
        kind: 'records-gap',
        icon: 'event_busy',
        text: role === 'planner' ? `Season ${gap.season}: ${farms} no records. Fill the gap or leave those farms out of the model sample.` : `Season ${gap.season}: ${farms} no records yet.`,
        link: farmsLink,
      });
    }
    if (facts.coverage.gaps.length > 3) steps.push({ kind: 'records-gap', icon: 'more_horiz', text: `${facts.coverage.gaps.length - 3} earlier seasons also have gaps.`, link: farmsLink });
  }

  if (role === 'planner' || role === 'admin') {
    const running = await repo.runInProgress(db);
    // The run the newest outlook rests on, else the newest finished run.
    const run = (outlooks[0]?.outlook.modelRunId ? await repo.succeededRunFacts(db, outlooks[0].outlook.modelRunId) : null) ?? (await repo.succeededRunFacts(db));
    if (running) steps.push({ kind: 'fit-running', icon: 'hourglass_top', text: `Run #${running.id} of “${running.modelName}” is ${running.status === 'queued' ? 'waiting for a worker' : 'fitting'}.`, link: { path: '/models', label: 'Open models' } });
    else if (!run && facts.farms > 0 && facts.prices > 0)
      steps.push({ kind: 'no-model', icon: 'model_training', text: 'No model has been fitted yet. Define one and fit it before projecting a season.', link: { path: '/models', label: 'Open models' } });
    else if (run && (await dataChangedSince(db, run)))
      steps.push({
        kind: 'model-stale',
        icon: 'published_with_changes',
        text: `The data changed since run #${run.id} of “${run.modelName}” was fitted${run.finishedAt ? ` on ${dayText(run.finishedAt)}` : ''}. Fit the model again so outlooks rest on today's records and prices.`,
        link: { path: '/models', label: 'Open models' },
      });
    for (const { outlook: o, season, latest } of outlooks) {
      const link = { path: `/outlook/${o.id}`, label: 'Open the outlook' };
      if (!latest) {
        steps.push({ kind: 'outlook-unpublished', icon: 'drafts', text: `The ${season} outlook is drafted but not published: members cannot read it yet.`, link });
        continue;
      }
      const upToDate = o.projectionStatus === 'succeeded' && o.projectionInputsHash === draftInputsHash(o);
      const unchanged = upToDate && latest.inputsHash === o.projectionInputsHash && (latest.commentary ?? '') === (o.commentary ?? '');
      if (!unchanged)
        steps.push({ kind: 'outlook-changed', icon: 'edit_note', text: `The ${season} outlook has changes since version ${latest.version} (published ${dayText(latest.publishedAt)}); members read version ${latest.version} until you publish again.`, link });
    }
  }

  if (role === 'treasurer' || role === 'admin') {
    const budgets = await repo.budgetSources(db);
    const newest = outlooks.find((o) => o.latest);
    if (newest?.latest) {
      const v = newest.latest;
      const fromIt = budgets.filter((b) => b.outlookVersionId === v.id);
      if (!fromIt.length && role === 'treasurer') {
        // A budget built from an earlier published version (version ids grow with each publication).
        const behind = budgets.find((b) => b.outlookVersionId !== null && b.outlookVersionId < v.id);
        steps.push(
          behind && v.version > 1
            ? { kind: 'budget-behind', icon: 'update', text: `Version ${v.version} of the ${newest.season} outlook was published on ${dayText(v.publishedAt)}; the budget “${behind.name}” follows an earlier version. Build the purchases again from the new one.`, link: { path: '/budget', label: 'Open budgets' } }
            : { kind: 'budget-missing', icon: 'request_quote', text: `The ${newest.season} outlook (version ${v.version}, published ${dayText(v.publishedAt)}) has no fertiliser budget yet. Build one from its price scenarios.`, link: { path: '/budget', label: 'Open budgets' } },
        );
      }
    }
  }
  return steps;
}

export async function coopSummary(db: Db, role: Role): Promise<CoopSummary> {
  const [farmCount, members, itemCounts, seasonRows, prices, records, withRecords, priced] = await Promise.all([
    repo.countFarms(db),
    repo.countMembers(db),
    repo.countItemsByRole(db),
    repo.seasonsInOrder(db),
    repo.countPriceObservations(db),
    repo.countFarmRecords(db),
    repo.farmsWithRecordsBySeason(db),
    repo.pricedSeasonIds(db),
  ]);
  const withData = seasonRows.filter((s) => priced.has(s.id) || withRecords.has(s.id));
  const lastWithData = seasonRows.findIndex((s) => s.id === withData.at(-1)?.id);
  const coverage = recordCoverage(seasonRows, withRecords, farmCount);
  const { coopName } = await getSettings(db);
  return {
    coopName,
    farms: farmCount,
    members,
    items: itemCounts,
    seasons: { count: withData.length, first: withData[0]?.label ?? null, last: withData.at(-1)?.label ?? null, opened: seasonRows.slice(lastWithData + 1).map((s) => s.label) },
    priceObservations: prices,
    farmRecords: records,
    recordGaps: coverage.gaps,
    lastRecordedSeason: coverage.lastRecorded,
    nextSteps: await nextSteps(db, role, { farms: farmCount, members, prices, coverage }),
    demo: await demoSetupState(db),
  };
}
