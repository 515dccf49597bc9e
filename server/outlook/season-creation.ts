/**
 * Opening a season that does not exist yet. Creating an outlook or a booking round names its season
 * by label; when no season has that label, this step creates it (the start month as the latest
 * season's, July without one) and audits `season.create`. A label whose start year another season
 * already has is refused.
 */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import * as repo from './outlook-repository.js';

/** Creates the season `label` ("2026/27"); call it only when no season has that label. */
export async function createSeason(db: Db, label: string, actorUserId: number): Promise<repo.SeasonRow> {
  const startYear = Number(label.slice(0, 4));
  const clash = await repo.findSeasonStartingIn(db, startYear);
  if (clash) throw AppError.conflict(`Season ${clash.label} already starts in ${startYear}`);
  const startMonth = (await repo.latestSeason(db))?.startMonth ?? 7;
  const created = await repo.insertSeason(db, { label, startYear, startMonth, startsOn: `${startYear}-${String(startMonth).padStart(2, '0')}-01` });
  await recordAudit(db, { actorUserId, action: 'season.create', entity: 'season', entityId: created.id, after: created });
  return created;
}

/** The season labelled `label`, created first (and audited) when there is none. */
export async function findOrCreateSeason(db: Db, label: string, actorUserId: number): Promise<repo.SeasonRow> {
  return (await repo.findSeasonByLabel(db, label)) ?? (await createSeason(db, label, actorUserId));
}
