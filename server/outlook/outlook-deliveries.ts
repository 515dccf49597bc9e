/** The delivery log of a published version's e-mails, and sending a failed one again. */
import type { Db } from '../db/client.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { deliveryLog, requeueFailed } from '../mail/outbox.js';
import { draftRow } from './outlook-drafts.js';
import * as repo from './outlook-repository.js';

/** One row per recipient of the outlook's `version` (the latest without one), with counts by status. */
export async function deliveries(db: Db, outlookId: number, version?: number) {
  await draftRow(db, outlookId);
  const versions = await repo.listVersions(db, outlookId);
  const v = version ? versions.find((x) => x.version === version) : versions[0];
  if (!v) throw AppError.notFound(version ? `Version ${version} of this outlook` : 'A published version of this outlook');
  const rows = await deliveryLog(db, v.id);
  const counts = { queued: 0, sending: 0, sent: 0, failed: 0, skipped: 0 };
  for (const r of rows) counts[r.status]++;
  return { outlookId, versionId: v.id, version: v.version, publishedAt: v.publishedAt, counts, rows };
}

/** Puts a failed message of one of the outlook's versions back in the queue (audited). */
export async function retryDelivery(db: Db, outlookId: number, deliveryId: number, actorUserId: number) {
  const versions = await repo.listVersions(db, outlookId);
  const row = await repo.findDelivery(db, deliveryId);
  if (!row || !versions.some((v) => v.id === row.versionId)) throw AppError.notFound('The delivery');
  if (!(await requeueFailed(db, deliveryId))) throw AppError.conflict(`Only a failed message can be sent again (this one is ${row.status})`);
  await recordAudit(db, { actorUserId, action: 'outlook.mail-retry', entity: 'mail', entityId: deliveryId });
}
