/**
 * Publishing a draft as an immutable version (the snapshot, each farm's part and the members'
 * e-mails in one transaction), and reading published versions in full.
 */
import type { Config } from '../config.js';
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getSettings } from '../settings/settings-service.js';
import type { FullVersion, OutlookSnapshot } from '../../shared/outlook-types.js';
import type { ItemExpectation } from './expectations-service.js';
import { OUTLOOK_CAUTIONS } from './outlook-cautions.js';
import { skillOfRun } from './run-choice.js';
import { draftInputsHash, succeededRun, type ProjectionTables } from './projection-service.js';
import { draftRow } from './outlook-drafts.js';
import { queueOutlookMails } from './outlook-member-mails.js';
import * as repo from './outlook-repository.js';

export type { OutlookSnapshot } from '../../shared/outlook-types.js';

/** The published versions (of one outlook, or of all), newest first. */
export const listVersions = repo.listVersions;

/**
 * Publishes the draft as the next version: the immutable snapshot, each farm's part, and — unless
 * told not to — one personal e-mail per subscribed member in the outbox, all in one transaction.
 */
export async function publishOutlook(db: Db, config: Pick<Config, 'publicUrl' | 'mailFrom'>, id: number, body: { commentary?: string; notifyMembers: boolean; acceptWeakSkill?: boolean }, actor: { id: number; name: string }) {
  return db.transaction(async (tx) => {
    let o = await draftRow(tx, id, true);
    if (body.commentary !== undefined && body.commentary !== o.commentary) {
      await repo.updateOutlook(tx, id, { commentary: body.commentary, updatedAt: new Date() });
      o = { ...o, commentary: body.commentary };
    }
    if (o.projectionStatus !== 'succeeded' || !o.projection) throw AppError.conflict('Project the season (and wait for it to finish) before publishing');
    if (o.projectionInputsHash !== draftInputsHash(o)) throw AppError.conflict('The draft has changed since it was projected; project it again before publishing');
    const tables = o.projection as ProjectionTables;
    const run = await succeededRun(tx, o.modelRunId!);
    // Before publishing: the items for which the model did not beat the plain per-hectare rule in its
    // back-test. The planner may publish anyway, and the warning is kept with the version.
    const skill = await skillOfRun(tx, run.id);
    if (skill?.weakItems.length && !body.acceptWeakSkill)
      throw new AppError(
        409,
        'weak_skill',
        `In its back-test the model did not beat the plain per-hectare rule for ${skill.weakItems.map((w) => w.name).join(', ')}; publish anyway only if you accept that`,
        skill.weakItems.map((w) => ({ path: `items.${w.item}`, message: w.sentence })),
      );
    const coop = await getSettings(tx);
    const version = (await repo.highestVersion(tx, id)) + 1;
    const publishedAt = new Date();
    const fit = run.result.fit;
    const snapshot: OutlookSnapshot = {
      outlookId: id,
      version,
      season: tables.season,
      title: o.title,
      commentary: o.commentary,
      publishedAt: publishedAt.toISOString(),
      publishedBy: actor.name,
      coopName: coop.coopName,
      currency: coop.currency,
      model: {
        runId: run.id,
        modelId: run.modelId,
        modelName: run.modelName,
        form: fit.layout.form,
        numeraire: fit.layout.numeraire,
        factors: fit.layout.factors,
        dataHash: run.dataHash,
        softwareVersion: run.softwareVersion,
        observations: fit.observations,
        sampleSeasons: fit.seasonYears,
        fittedAt: run.finishedAt?.toISOString() ?? null,
      },
      expectations: o.expectations as ItemExpectation[],
      scenarioRule: tables.scenarioRule,
      scenarioRuleText: tables.scenarioRuleText,
      scenarios: tables.scenarios,
      projection: { draws: tables.draws, seed: tables.seed, trendSeason: tables.trendSeason, computedAt: tables.computedAt, farmsProjected: tables.farms.length, coop: tables.coop, ...(tables.band ? { band: tables.band } : {}) },
      cautions: [...OUTLOOK_CAUTIONS, ...tables.cautions],
      skill: skill ? { text: skill.text, weakItems: skill.weakItems } : null,
    };
    const versionId = await repo.insertVersion(
      tx,
      { outlookId: id, version, seasonId: o.seasonId, modelRunId: run.id, snapshot, inputsHash: tables.inputsHash, publishedBy: actor.id, publishedAt },
      tables.farms,
    );

    let mails = { queued: 0, skipped: 0 };
    if (body.notifyMembers) mails = await queueOutlookMails(tx, config, snapshot, versionId, tables.farms);
    await recordAudit(tx, { actorUserId: actor.id, action: 'outlook.publish', entity: 'outlook', entityId: id, after: { versionId, version, inputsHash: tables.inputsHash, mails, ...(skill?.weakItems.length ? { publishedDespite: skill.weakItems.map((w) => w.sentence) } : {}) } });
    return { id: versionId, outlookId: id, version, season: tables.season.label, publishedAt, mails };
  });
}

/** A published version's row, or a 404. */
export async function publishedVersion(db: Db, versionId: number) {
  const row = await repo.findVersion(db, versionId);
  if (!row) throw AppError.notFound('The published outlook');
  return row;
}

/** A published version in full (co-op part and every farm): planners, treasurers, admins. */
export async function fullVersion(db: Db, versionId: number): Promise<FullVersion> {
  const row = await publishedVersion(db, versionId);
  const farmsOut = (await repo.allFarmParts(db, versionId)).sort((a, b) => a.code.localeCompare(b.code));
  return { id: row.id, ...(row.snapshot as OutlookSnapshot), farms: farmsOut };
}
