import { count, desc, eq } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { auditLog, budgets, deliveryPoints, farms, fertiliserProducts, items, models, outlooks, seasons, users } from '../db/schema/index.js';
import { describeAudit, type AuditNames } from './audit-describe.js';

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

async function nameMaps(db: Db): Promise<AuditNames> {
  const map = <T extends { id: number; name: string | null }>(rows: T[]) => new Map(rows.map((r) => [r.id, r.name ?? `#${r.id}`]));
  const [u, f, i, s, d, p, b, m, o] = await Promise.all([
    db.select({ id: users.id, name: users.name }).from(users),
    db.select({ id: farms.id, name: farms.name }).from(farms),
    db.select({ id: items.id, name: items.name }).from(items),
    db.select({ id: seasons.id, name: seasons.label }).from(seasons),
    db.select({ id: deliveryPoints.id, name: deliveryPoints.name }).from(deliveryPoints),
    db.select({ id: fertiliserProducts.id, name: fertiliserProducts.name }).from(fertiliserProducts),
    db.select({ id: budgets.id, name: budgets.name }).from(budgets),
    db.select({ id: models.id, name: models.name }).from(models),
    db.select({ id: outlooks.id, name: outlooks.title }).from(outlooks),
  ]);
  return { users: map(u), farms: map(f), items: map(i), seasons: map(s), deliveryPoints: map(d), products: map(p), budgets: map(b), models: map(m), outlooks: map(o) };
}

/** A page of the audit log, newest first, each entry with its sentence and changed fields in words. */
export async function listAudit(db: Db, limit: number, offset: number, entity?: string) {
  const only = entity ? eq(auditLog.entity, entity) : undefined;
  const rows = await db
    .select({
      id: auditLog.id,
      at: auditLog.at,
      actorEmail: users.email,
      actorName: users.name,
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
  const names = rows.length ? await nameMaps(db) : null;
  return { rows: rows.map((r) => ({ ...r, at: r.at.toISOString(), ...describeAudit(r, names!) })), total };
}
