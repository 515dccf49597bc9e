/**
 * The member portal's views of published outlooks: the co-op part and the member's own farm part
 * only. The farm comes from the session (never from the request), and the repository query that
 * reads a farm part is held to it (`farmPart`).
 */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import type { MemberVersion, OutlookSnapshot } from '../../shared/outlook-types.js';
import { memberPlain } from './member-plain.js';
import { publishedVersion } from './outlook-publishing.js';
import * as repo from './outlook-repository.js';

/** The published versions as the portal lists them (no model runs, no names of who published). */
export async function portalVersions(db: Db) {
  return (await repo.listVersions(db)).map((v) => ({ id: v.id, outlookId: v.outlookId, version: v.version, season: v.season, title: v.title, publishedAt: v.publishedAt }));
}

/** The newest published version for a member, or null while nothing is published (an empty state, not an error). */
export async function latestMemberVersion(db: Db, farmId: number | null): Promise<MemberVersion | null> {
  return (await repo.anyVersionPublished(db)) ? memberVersion(db, farmId) : null;
}

/**
 * A published version as one member reads it, with the portal's plain reading. Without an id: the
 * newest version of the latest season that has one.
 */
export async function memberVersion(db: Db, farmId: number | null, versionId?: number): Promise<MemberVersion> {
  const row = versionId ? await publishedVersion(db, versionId) : await repo.newestVersion(db);
  if (!row) throw AppError.notFound('A published outlook');
  const farm = farmId !== null ? await repo.farmPart(db, row.id, farmId) : null;
  const snapshot = row.snapshot as OutlookSnapshot;
  return { id: row.id, ...snapshot, farm, plain: await memberPlain(db, row.id, snapshot, farm) };
}
