import { and, asc, desc, eq, getTableColumns, sql } from 'drizzle-orm';
import { myContracts } from '../contracts/contracted-service.js';
import { contractMailPart, type MailPart } from '../mail/contract-mail.js';
import { skillOfRun } from './run-choice.js';
import type { Config } from '../config.js';
import type { Db } from '../db/client.js';
import { farms, futuresQuotes, mailOutbox, outlooks, outlookVersionFarms, outlookVersions, seasons, users } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { enqueueJob } from '../jobs/job-queue.js';
import { deliveryLog, enqueueMail, mailDomain, requeueFailed, type NewOutboxMail } from '../mail/outbox.js';
import { outlookMailOf } from '../mail/outlook-mail.js';
import { getSettings } from '../settings/settings-service.js';
import { SCENARIO_RULE_TEXT, type ExpectationSetting, type ScenarioRule } from './expectations.js';
import { computeExpectations, type ItemExpectation } from './expectations-service.js';
import { OUTLOOK_CAUTIONS } from './outlook-cautions.js';
import {
  draftInputsHash,
  gatherProjectionInputs,
  OUTLOOK_PROJECTION_JOB,
  succeededRun,
  type CoopProjection,
  type FarmOutlook,
  type ItemProjection,
  type OutlookRow,
  type ProjectionTables,
} from './projection-service.js';
import type { FullVersion, MemberVersion, OutlookSnapshot } from '../../shared/outlook-types.js';
import { signUnsubscribe, unsubscribeSecret } from './unsubscribe-token.js';
import { memberPlain } from './member-plain.js';

/** Where the e-mail's portal link points (the member's page with the published outlook). */
export const PORTAL_PATH = '/my-farm/outlook';

export type { OutlookSnapshot } from '../../shared/outlook-types.js';

// ---------------------------------------------------------------------------------------------
// Drafts

export async function seasonFor(db: Db, label: string, actorUserId: number) {
  const [found] = await db.select().from(seasons).where(eq(seasons.label, label));
  if (found) return found;
  const startYear = Number(label.slice(0, 4));
  const [clash] = await db.select().from(seasons).where(eq(seasons.startYear, startYear));
  if (clash) throw AppError.conflict(`Season ${clash.label} already starts in ${startYear}`);
  const [latest] = await db.select().from(seasons).orderBy(desc(seasons.startYear)).limit(1);
  const startMonth = latest?.startMonth ?? 7;
  const [created] = await db
    .insert(seasons)
    .values({ label, startYear, startMonth, startsOn: `${startYear}-${String(startMonth).padStart(2, '0')}-01` })
    .returning();
  await recordAudit(db, { actorUserId, action: 'season.create', entity: 'season', entityId: created!.id, after: created });
  return created!;
}

/** Last season's price for every item of the run: a plain start the planner then changes. */
async function defaultExpectations(db: Db, runId: number, target: { label: string; startYear: number }) {
  const run = await succeededRun(db, runId);
  const settings: ExpectationSetting[] = run.result.fit.layout.items.map((i) => ({ item: i.name, method: { kind: 'last' } }));
  try {
    return { settings, computed: await computeExpectations(db, settings, target) };
  } catch (err) {
    if (err instanceof AppError && err.status === 422) return { settings: [] as ExpectationSetting[], computed: [] as ItemExpectation[] };
    throw err;
  }
}

export async function createOutlook(db: Db, input: { season: string; title?: string; modelRunId?: number | null }, actorUserId: number) {
  const id = await db.transaction(async (tx) => {
    const season = await seasonFor(tx, input.season, actorUserId);
    const [existing] = await tx.select({ id: outlooks.id }).from(outlooks).where(eq(outlooks.seasonId, season.id));
    if (existing) throw AppError.conflict(`An outlook for ${season.label} exists already (id ${existing.id}); open it or publish a new version of it`);
    let settings: ExpectationSetting[] = [];
    let computed: ItemExpectation[] = [];
    if (input.modelRunId) ({ settings, computed } = await defaultExpectations(tx, input.modelRunId, season));
    const [row] = await tx
      .insert(outlooks)
      .values({
        seasonId: season.id,
        title: input.title ?? `Season outlook ${season.label}`,
        modelRunId: input.modelRunId ?? null,
        expectationSettings: settings,
        expectations: computed,
        createdBy: actorUserId,
      })
      .returning();
    await recordAudit(tx, { actorUserId, action: 'outlook.create', entity: 'outlook', entityId: row!.id, after: { season: season.label, title: row!.title, modelRunId: row!.modelRunId } });
    return row!.id;
  });
  return getOutlook(db, id);
}

async function draftRow(db: Db, id: number, lock = false): Promise<OutlookRow> {
  const q = db.select().from(outlooks).where(eq(outlooks.id, id));
  const [row] = lock ? await q.for('update') : await q;
  if (!row) throw AppError.notFound('The outlook');
  return row;
}

export async function listVersions(db: Db, outlookId?: number) {
  return db
    .select({
      id: outlookVersions.id,
      outlookId: outlookVersions.outlookId,
      version: outlookVersions.version,
      season: seasons.label,
      title: sql<string>`${outlookVersions.snapshot}->>'title'`,
      modelRunId: outlookVersions.modelRunId,
      publishedAt: outlookVersions.publishedAt,
      publishedBy: users.name,
    })
    .from(outlookVersions)
    .innerJoin(seasons, eq(seasons.id, outlookVersions.seasonId))
    .leftJoin(users, eq(users.id, outlookVersions.publishedBy))
    .where(outlookId ? eq(outlookVersions.outlookId, outlookId) : undefined)
    .orderBy(desc(seasons.startYear), desc(outlookVersions.version));
}

export async function listOutlooks(db: Db) {
  const rows = await db
    .select({ id: outlooks.id, season: seasons.label, startYear: seasons.startYear, title: outlooks.title, modelRunId: outlooks.modelRunId, projectionStatus: outlooks.projectionStatus, updatedAt: outlooks.updatedAt })
    .from(outlooks)
    .innerJoin(seasons, eq(seasons.id, outlooks.seasonId))
    .orderBy(desc(seasons.startYear));
  const versions = await listVersions(db);
  return rows.map((r) => {
    const mine = versions.filter((v) => v.outlookId === r.id);
    return { ...r, versions: mine.length, latestVersion: mine[0] ? { id: mine[0].id, version: mine[0].version, publishedAt: mine[0].publishedAt } : null };
  });
}

/**
 * Whether the draft as it stands is what its latest version published: the same projection inputs,
 * an up-to-date projection and the same commentary. The page's badge says "Published" then, and
 * "Draft" once anything changed since.
 */
async function publishedState(db: Db, o: OutlookRow, upToDate: boolean) {
  const [latest] = await db
    .select({ version: outlookVersions.version, inputsHash: outlookVersions.inputsHash, commentary: sql<string | null>`${outlookVersions.snapshot}->>'commentary'`, publishedAt: outlookVersions.publishedAt })
    .from(outlookVersions)
    .where(eq(outlookVersions.outlookId, o.id))
    .orderBy(desc(outlookVersions.version))
    .limit(1);
  if (!latest) return { version: null, publishedAt: null, unchangedSince: false };
  const unchangedSince = upToDate && latest.inputsHash === o.projectionInputsHash && (latest.commentary ?? '') === (o.commentary ?? '');
  return { version: latest.version, publishedAt: latest.publishedAt, unchangedSince };
}

export async function getOutlook(db: Db, id: number) {
  const o = await draftRow(db, id);
  const [season] = await db.select().from(seasons).where(eq(seasons.id, o.seasonId));
  const versions = await listVersions(db, id);
  const hash = draftInputsHash(o);
  const upToDate = o.projectionStatus === 'succeeded' && o.projectionInputsHash === hash;
  return {
    id: o.id,
    season: season!.label,
    seasonStartYear: season!.startYear,
    title: o.title,
    modelRunId: o.modelRunId,
    expectationSettings: o.expectationSettings as ExpectationSetting[],
    expectations: o.expectations as ItemExpectation[],
    scenarioRule: o.scenarioRule,
    scenarioRuleText: SCENARIO_RULE_TEXT[o.scenarioRule],
    draws: o.draws,
    seed: o.seed,
    commentary: o.commentary,
    projection: {
      status: o.projectionStatus,
      progress: o.projectionProgress,
      stage: o.projectionStage,
      error: o.projectionError,
      projectedAt: o.projectedAt,
      upToDate,
    },
    versions,
    published: await publishedState(db, o, upToDate),
    skill: await skillOfRun(db, o.modelRunId),
    cautions: OUTLOOK_CAUTIONS,
    createdAt: o.createdAt,
    updatedAt: o.updatedAt,
  };
}

export async function patchOutlook(
  db: Db,
  id: number,
  patch: Partial<{ title: string; modelRunId: number | null; commentary: string; scenarioRule: ScenarioRule; draws: number; seed: number }>,
  actorUserId: number,
) {
  await db.transaction(async (tx) => {
    const before = await draftRow(tx, id, true);
    const values: Partial<typeof outlooks.$inferInsert> = { ...patch, updatedAt: new Date() };
    if (patch.modelRunId) {
      await succeededRun(tx, patch.modelRunId);
      if (!(before.expectationSettings as unknown[]).length) {
        const [season] = await tx.select().from(seasons).where(eq(seasons.id, before.seasonId));
        const d = await defaultExpectations(tx, patch.modelRunId, season!);
        values.expectationSettings = d.settings;
        values.expectations = d.computed;
      }
    }
    await tx.update(outlooks).set(values).where(eq(outlooks.id, id));
    await recordAudit(tx, {
      actorUserId,
      action: 'outlook.update',
      entity: 'outlook',
      entityId: id,
      before: Object.fromEntries(Object.keys(patch).map((k) => [k, before[k as keyof OutlookRow]])),
      after: patch,
    });
  });
  return getOutlook(db, id);
}

export async function setExpectations(db: Db, id: number, settings: ExpectationSetting[], actorUserId: number) {
  await db.transaction(async (tx) => {
    const before = await draftRow(tx, id, true);
    const [season] = await tx.select().from(seasons).where(eq(seasons.id, before.seasonId));
    const computed = await computeExpectations(tx, settings, season!);
    await tx.update(outlooks).set({ expectationSettings: settings, expectations: computed, updatedAt: new Date() }).where(eq(outlooks.id, id));
    await recordAudit(tx, {
      actorUserId,
      action: 'outlook.expectations',
      entity: 'outlook',
      entityId: id,
      before: before.expectationSettings,
      after: settings.map((s) => ({ ...s, base: computed.find((c) => c.item === s.item)?.base })),
    });
  });
  return getOutlook(db, id);
}

export async function outlookSeason(db: Db, id: number) {
  const o = await draftRow(db, id);
  const [season] = await db.select().from(seasons).where(eq(seasons.id, o.seasonId));
  return season!;
}

// ---------------------------------------------------------------------------------------------
// Projection

export async function startProjection(db: Db, id: number, actorUserId: number) {
  return db.transaction(async (tx) => {
    const o = await draftRow(tx, id, true);
    if (o.projectionStatus === 'queued' || o.projectionStatus === 'running') throw AppError.conflict('A projection of this outlook is already under way');
    await gatherProjectionInputs(tx, o); // refuses now what the job would refuse later
    await tx.update(outlooks).set({ projectionStatus: 'queued', projectionProgress: 0, projectionStage: 'Waiting for a worker', projectionError: null }).where(eq(outlooks.id, id));
    const job = await enqueueJob(tx, OUTLOOK_PROJECTION_JOB, id);
    await recordAudit(tx, { actorUserId, action: 'outlook.project', entity: 'outlook', entityId: id, after: { jobId: job.id, modelRunId: o.modelRunId, draws: o.draws, seed: o.seed } });
    return { status: 'queued' as const, jobId: job.id };
  });
}

export async function getProjection(db: Db, id: number) {
  const o = await draftRow(db, id);
  return {
    status: o.projectionStatus,
    progress: o.projectionProgress,
    stage: o.projectionStage,
    error: o.projectionError,
    projectedAt: o.projectedAt,
    upToDate: o.projectionStatus === 'succeeded' && o.projectionInputsHash === draftInputsHash(o),
    result: (o.projection as ProjectionTables | null) ?? null,
  };
}

// ---------------------------------------------------------------------------------------------
// Publishing

/**
 * Publishes the draft as the next version: the immutable snapshot, each farm's part, and — unless
 * told not to — one personal e-mail per subscribed member in the outbox, all in one transaction.
 */
export async function publishOutlook(db: Db, config: Pick<Config, 'publicUrl' | 'mailFrom'>, id: number, body: { commentary?: string; notifyMembers: boolean; acceptWeakSkill?: boolean }, actor: { id: number; name: string }) {
  return db.transaction(async (tx) => {
    let o = await draftRow(tx, id, true);
    if (body.commentary !== undefined && body.commentary !== o.commentary) {
      await tx.update(outlooks).set({ commentary: body.commentary, updatedAt: new Date() }).where(eq(outlooks.id, id));
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
    const [{ max }] = await tx.select({ max: sql<number | null>`max(${outlookVersions.version})` }).from(outlookVersions).where(eq(outlookVersions.outlookId, id));
    const version = (max === null ? 0 : Number(max)) + 1;
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
    const [row] = await tx
      .insert(outlookVersions)
      .values({ outlookId: id, version, seasonId: o.seasonId, modelRunId: run.id, snapshot, inputsHash: tables.inputsHash, publishedBy: actor.id, publishedAt })
      .returning({ id: outlookVersions.id });
    const versionId = row!.id;
    if (tables.farms.length) await tx.insert(outlookVersionFarms).values(tables.farms.map((f) => ({ versionId, farmId: f.farmId, data: f })));

    let mails = { queued: 0, skipped: 0 };
    if (body.notifyMembers) mails = await queueOutlookMails(tx, config, snapshot, versionId, tables.farms);
    await recordAudit(tx, { actorUserId: actor.id, action: 'outlook.publish', entity: 'outlook', entityId: id, after: { versionId, version, inputsHash: tables.inputsHash, mails, ...(skill?.weakItems.length ? { publishedDespite: skill.weakItems.map((w) => w.sentence) } : {}) } });
    return { id: versionId, outlookId: id, version, season: tables.season.label, publishedAt, mails };
  });
}

async function queueOutlookMails(tx: Db, config: Pick<Config, 'publicUrl' | 'mailFrom'>, s: OutlookSnapshot, versionId: number, farmParts: FarmOutlook[]) {
  const members = await tx
    .select({ id: users.id, email: users.email, name: users.name, active: users.active, optOut: users.mailOptOut, passwordHash: users.passwordHash, farmId: users.farmId })
    .from(users)
    .where(and(eq(users.role, 'member'), eq(users.active, true)))
    .orderBy(asc(users.id));
  const secret = await unsubscribeSecret(tx);
  const byFarm = new Map(farmParts.map((f) => [f.farmId, f]));
  // Each member's delivery contracts of the season, with their farm's figures (issue 19).
  const contractParts = new Map<number, MailPart | null>();
  for (const farmId of new Set(members.map((m) => m.farmId).filter((f): f is number => f !== null))) {
    const mine = await myContracts(tx, { role: 'member', farmId }, s.season.label);
    contractParts.set(farmId, contractMailPart(mine));
  }
  const mails: NewOutboxMail[] = members.map((m) => {
    const key = `outlook.v${versionId}.u${m.id}`;
    const unsubscribeUrl = `${config.publicUrl}/api/unsubscribe/${signUnsubscribe(secret, m.id)}`;
    const farm = m.farmId !== null ? (byFarm.get(m.farmId) ?? null) : null;
    const content = outlookMailOf(s, farm, { email: m.email, name: m.name }, { portalUrl: `${config.publicUrl}${PORTAL_PATH}`, unsubscribeUrl }, m.farmId !== null ? (contractParts.get(m.farmId) ?? null) : null);
    const skipReason = m.optOut ? 'The member has opted out of outlook e-mails' : !m.passwordHash ? 'The member has not accepted the invitation yet' : undefined;
    return {
      idempotencyKey: key,
      kind: 'outlook',
      outlookVersionId: versionId,
      userId: m.id,
      ...content,
      headers: {
        'List-Unsubscribe': `<${unsubscribeUrl}>`,
        'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
        'List-Id': `Season outlooks <outlooks.${mailDomain(config.mailFrom)}>`,
      },
      skipReason,
    };
  });
  await enqueueMail(tx, mails, mailDomain(config.mailFrom));
  return { queued: mails.filter((m) => !m.skipReason).length, skipped: mails.filter((m) => m.skipReason).length };
}

// ---------------------------------------------------------------------------------------------
// Reading published versions

async function versionRow(db: Db, versionId: number) {
  const [row] = await db.select().from(outlookVersions).where(eq(outlookVersions.id, versionId));
  if (!row) throw AppError.notFound('The published outlook');
  return row;
}

/** A published version in full (co-op part and every farm): planners, treasurers, admins. */
export async function fullVersion(db: Db, versionId: number): Promise<FullVersion> {
  const row = await versionRow(db, versionId);
  const parts = await db.select({ data: outlookVersionFarms.data }).from(outlookVersionFarms).where(eq(outlookVersionFarms.versionId, versionId));
  const farmsOut = parts.map((p) => p.data as FarmOutlook).sort((a, b) => a.code.localeCompare(b.code));
  return { id: row.id, ...(row.snapshot as OutlookSnapshot), farms: farmsOut };
}

/**
 * A published version as one member reads it: the co-op part and their own farm's part only. The
 * farm comes from the session (never from the request), and the query itself is held to it.
 * Without an id: the newest version of the latest season that has one.
 */
/** The newest published version for a member, or null while nothing is published (an empty state, not an error). */
export async function latestMemberVersion(db: Db, farmId: number | null): Promise<MemberVersion | null> {
  const [any] = await db.select({ id: outlookVersions.id }).from(outlookVersions).limit(1);
  return any ? memberVersion(db, farmId) : null;
}

export async function memberVersion(db: Db, farmId: number | null, versionId?: number): Promise<MemberVersion> {
  let row: typeof outlookVersions.$inferSelect | undefined;
  if (versionId) row = await versionRow(db, versionId);
  else
    [row] = await db
      .select(getTableColumns(outlookVersions))
      .from(outlookVersions)
      .innerJoin(seasons, eq(seasons.id, outlookVersions.seasonId))
      .orderBy(desc(seasons.startYear), desc(outlookVersions.version))
      .limit(1);
  if (!row) throw AppError.notFound('A published outlook');
  let farm: FarmOutlook | null = null;
  if (farmId !== null) {
    const [part] = await db
      .select({ data: outlookVersionFarms.data })
      .from(outlookVersionFarms)
      .where(and(eq(outlookVersionFarms.versionId, row.id), eq(outlookVersionFarms.farmId, farmId)));
    farm = (part?.data as FarmOutlook | undefined) ?? null;
  }
  const snapshot = row.snapshot as OutlookSnapshot;
  return { id: row.id, ...snapshot, farm, plain: await memberPlain(db, row.id, snapshot, farm) };
}

export async function deliveries(db: Db, outlookId: number, version?: number) {
  await draftRow(db, outlookId);
  const versions = await listVersions(db, outlookId);
  const v = version ? versions.find((x) => x.version === version) : versions[0];
  if (!v) throw AppError.notFound(version ? `Version ${version} of this outlook` : 'A published version of this outlook');
  const rows = await deliveryLog(db, v.id);
  const counts = { queued: 0, sending: 0, sent: 0, failed: 0, skipped: 0 };
  for (const r of rows) counts[r.status]++;
  return { outlookId, versionId: v.id, version: v.version, publishedAt: v.publishedAt, counts, rows };
}

export async function retryDelivery(db: Db, outlookId: number, deliveryId: number, actorUserId: number) {
  const versions = await listVersions(db, outlookId);
  const [row] = await db.select({ id: mailOutbox.id, status: mailOutbox.status, versionId: mailOutbox.outlookVersionId }).from(mailOutbox).where(eq(mailOutbox.id, deliveryId));
  if (!row || !versions.some((v) => v.id === row.versionId)) throw AppError.notFound('The delivery');
  if (!(await requeueFailed(db, deliveryId))) throw AppError.conflict(`Only a failed message can be sent again (this one is ${row.status})`);
  await recordAudit(db, { actorUserId, action: 'outlook.mail-retry', entity: 'mail', entityId: deliveryId });
}

/**
 * Deletes every outlook, version and outbox row: for a full reset of the database only (the demo
 * reload). Published versions refuse deletion unless this transaction says so.
 */
export async function purgeOutlookData(tx: Db) {
  await tx.execute(sql`select set_config('netput.purge_outlooks', 'on', true)`);
  await tx.delete(mailOutbox);
  await tx.delete(outlookVersionFarms);
  await tx.delete(outlookVersions);
  await tx.delete(outlooks);
  await tx.delete(futuresQuotes);
}
