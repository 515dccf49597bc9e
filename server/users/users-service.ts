import { asc, eq } from 'drizzle-orm';
import type { UserStatus, UserSummary } from '../../shared/api-types.js';
import { ROLE_LABELS, type Role } from '../../shared/roles.js';
import type { Db } from '../db/client.js';
import { farms, sessions, users } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import { INVITE_DAYS, issueToken } from '../auth/auth-service.js';
import type { AppContext } from '../context.js';
import { invitationMail } from '../mail/templates.js';
import { getSettings } from '../settings/settings-service.js';

function statusOf(u: { active: boolean; passwordHash: string | null }): UserStatus {
  if (!u.active) return 'deactivated';
  return u.passwordHash ? 'active' : 'invited';
}

const summaryColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  active: users.active,
  passwordHash: users.passwordHash,
  createdAt: users.createdAt,
  lastSignInAt: users.lastSignInAt,
  farmId: farms.id,
  farmName: farms.name,
};

function toSummary(r: {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  passwordHash: string | null;
  createdAt: Date;
  lastSignInAt: Date | null;
  farmId: number | null;
  farmName: string | null;
}): UserSummary {
  return {
    id: r.id,
    email: r.email,
    name: r.name,
    role: r.role,
    farmId: r.farmId,
    farmName: r.farmName,
    status: statusOf(r),
    createdAt: r.createdAt.toISOString(),
    lastSignInAt: r.lastSignInAt?.toISOString() ?? null,
  };
}

export async function listUsers(db: Db): Promise<UserSummary[]> {
  const rows = await db.select(summaryColumns).from(users).leftJoin(farms, eq(farms.ownerUserId, users.id)).orderBy(asc(users.name));
  return rows.map(toSummary);
}

export async function getUser(db: Db, id: number): Promise<UserSummary> {
  const [row] = await db.select(summaryColumns).from(users).leftJoin(farms, eq(farms.ownerUserId, users.id)).where(eq(users.id, id));
  if (!row) throw AppError.notFound('The user');
  return toSummary(row);
}

async function assignFarm(db: Db, userId: number, farmId: number | null | undefined) {
  if (farmId === undefined) return;
  await db.update(farms).set({ ownerUserId: null }).where(eq(farms.ownerUserId, userId));
  if (farmId === null) return;
  const [farm] = await db.select({ id: farms.id, owner: farms.ownerUserId }).from(farms).where(eq(farms.id, farmId));
  if (!farm) throw AppError.invalid('The farm does not exist', [{ path: 'body.farmId', message: 'No farm has this id' }]);
  if (farm.owner !== null && farm.owner !== userId) {
    throw AppError.conflict('This farm already belongs to another member; unassign it first');
  }
  await db.update(farms).set({ ownerUserId: userId }).where(eq(farms.id, farmId));
}

export interface Invitation {
  email: string;
  name: string;
  role: Role;
  farmId?: number | null;
}

/** Creates the account (no password yet) and e-mails a one-time link; all in one transaction. */
export async function inviteUser(ctx: AppContext, inv: Invitation, actorUserId: number): Promise<UserSummary> {
  if (inv.farmId && inv.role !== 'member') {
    throw AppError.invalid('Only members own a farm', [{ path: 'body.farmId', message: 'Leave empty unless the role is member' }]);
  }
  const { id, token } = await ctx.db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email));
    if (existing) throw AppError.conflict(`An account for ${inv.email} already exists`);
    const [created] = await tx.insert(users).values({ email: inv.email, name: inv.name, role: inv.role }).returning({ id: users.id });
    await assignFarm(tx, created.id, inv.farmId ?? undefined);
    const token = await issueToken(tx, created.id, 'invite');
    await recordAudit(tx, { actorUserId, action: 'user.invite', entity: 'user', entityId: created.id, after: inv });
    return { id: created.id, token };
  });
  const { coopName } = await getSettings(ctx.db);
  await ctx.mailer.send(
    invitationMail(inv.email, inv.name, ROLE_LABELS[inv.role].toLowerCase(), `${ctx.config.publicUrl}/invite/${token}`, coopName, INVITE_DAYS),
  );
  return getUser(ctx.db, id);
}

export interface UserPatch {
  name?: string;
  role?: Role;
  farmId?: number | null;
  active?: boolean;
}

export async function updateUser(db: Db, id: number, patch: UserPatch, actorUserId: number): Promise<UserSummary> {
  if (id === actorUserId && (patch.active === false || (patch.role && patch.role !== 'admin'))) {
    throw AppError.conflict('You cannot deactivate or demote your own account; ask another administrator');
  }
  await db.transaction(async (tx) => {
    const before = await getUser(tx, id);
    const role = patch.role ?? before.role;
    if (patch.farmId && role !== 'member') {
      throw AppError.invalid('Only members own a farm', [{ path: 'body.farmId', message: 'Leave empty unless the role is member' }]);
    }
    const set: Partial<typeof users.$inferInsert> = {};
    if (patch.name !== undefined) set.name = patch.name;
    if (patch.role !== undefined) set.role = patch.role;
    if (patch.active !== undefined) set.active = patch.active;
    if (Object.keys(set).length) await tx.update(users).set(set).where(eq(users.id, id));
    await assignFarm(tx, id, role !== 'member' ? (before.farmId ? null : undefined) : patch.farmId);
    // A deactivated account, or one whose role changed, signs in again.
    if (patch.active === false || (patch.role && patch.role !== before.role)) await tx.delete(sessions).where(eq(sessions.userId, id));
    const after = await getUser(tx, id);
    await recordAudit(tx, { actorUserId, action: 'user.update', entity: 'user', entityId: id, before, after });
  });
  return getUser(db, id);
}
