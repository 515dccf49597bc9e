import { count, desc, eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { auditLog, users } from '../db/schema/index.js';

export interface AuditEntry {
  actorUserId: number | null;
  action: string;
  entity: string;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
}

/** Records who changed what; call it inside the same transaction as the change. */
export async function recordAudit(db: Db, entry: AuditEntry) {
  await db.insert(auditLog).values({
    actorUserId: entry.actorUserId,
    action: entry.action,
    entity: entry.entity,
    entityId: entry.entityId == null ? null : String(entry.entityId),
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}

export async function listAudit(db: Db, limit: number, offset: number, entity?: string) {
  const only = entity ? eq(auditLog.entity, entity) : undefined;
  const rows = await db
    .select({
      id: auditLog.id,
      at: auditLog.at,
      actorEmail: users.email,
      action: auditLog.action,
      entity: auditLog.entity,
      entityId: auditLog.entityId,
      before: auditLog.before,
      after: auditLog.after,
    })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorUserId))
    .where(only)
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(limit)
    .offset(offset);
  const [{ total }] = await db.select({ total: count() }).from(auditLog).where(only);
  return { rows: rows.map((r) => ({ ...r, at: r.at.toISOString() })), total };
}
