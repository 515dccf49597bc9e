import { and, asc, eq, isNull } from 'drizzle-orm';
import type { UserStatus, UserSummary } from '../../shared/api-types.js';
import type { Role } from '../../shared/roles.js';
import type { Db } from '../db/client.js';
import { farms, sessions, users } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { AppContext } from '../context.js';
import { mailOneTimeLink, MailNotSent } from '../auth/link-mail.js';

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
  const rows = await db.select(summaryColumns).from(users).leftJoin(farms, eq(farms.id, users.farmId)).orderBy(asc(users.name));
  return rows.map(toSummary);
}

export async function getUser(db: Db, id: number): Promise<UserSummary> {
  const [row] = await db.select(summaryColumns).from(users).leftJoin(farms, eq(farms.id, users.farmId)).where(eq(users.id, id));
  if (!row) throw AppError.notFound('The user');
  return toSummary(row);
}

/** Links a member to a farm (several members may share one, e.g. a family farm), or unlinks with null. */
async function assignFarm(db: Db, userId: number, farmId: number | null | undefined) {
  if (farmId === undefined) return;
  if (farmId !== null) {
    const [farm] = await db.select({ id: farms.id }).from(farms).where(eq(farms.id, farmId));
    if (!farm) throw AppError.invalid('The farm does not exist', [{ path: 'body.farmId', message: 'No farm has this id' }]);
  }
  await db.update(users).set({ farmId }).where(eq(users.id, userId));
}

export interface Invitation {
  email: string;
  name: string;
  role: Role;
  farmId?: number | null;
}

function mailDown(message: string, err: MailNotSent) {
  const e = new AppError(503, 'mail_unavailable', message);
  e.cause = err;
  return e;
}

/**
 * Creates the account (no password yet) and e-mails a one-time link, all or nothing: when the mail
 * service cannot take the invitation, the account is removed again and the answer is a 503 that
 * says so, so the same invitation can simply be sent again later.
 */
export async function inviteUser(ctx: AppContext, inv: Invitation, actorUserId: number): Promise<UserSummary> {
  if (inv.farmId && inv.role !== 'member') {
    throw AppError.invalid('Only members belong to a farm', [{ path: 'body.farmId', message: 'Leave empty unless the role is member' }]);
  }
  const id = await ctx.db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email));
    if (existing) throw AppError.conflict(`An account for ${inv.email} already exists`);
    const [created] = await tx.insert(users).values({ email: inv.email, name: inv.name, role: inv.role }).returning({ id: users.id });
    await assignFarm(tx, created!.id, inv.farmId ?? undefined);
    return created!.id;
  });
  try {
    await mailOneTimeLink(ctx, { id, email: inv.email, name: inv.name, role: inv.role }, 'invite');
  } catch (err) {
    // Its only token went with the failed message; the account has done nothing yet.
    await ctx.db.delete(users).where(and(eq(users.id, id), isNull(users.passwordHash)));
    if (err instanceof MailNotSent) {
      throw mailDown(`The mail service could not be reached, so the invitation to ${inv.email} was not sent and no account was created. Try again in a few minutes.`, err);
    }
    throw err;
  }
  await recordAudit(ctx.db, { actorUserId, action: 'user.invite', entity: 'user', entityId: id, after: inv });
  return getUser(ctx.db, id);
}

/** Sends a new invitation link to an account that has not accepted yet; the earlier link stops working. */
export async function resendInvitation(ctx: AppContext, id: number, actorUserId: number): Promise<{ message: string }> {
  const user = await getUser(ctx.db, id);
  if (user.status === 'active') throw AppError.conflict(`${user.name} has already accepted the invitation; send a reset link if they cannot sign in`);
  if (user.status === 'deactivated') throw AppError.conflict('Reactivate the account before inviting again');
  try {
    await mailOneTimeLink(ctx, user, 'invite');
  } catch (err) {
    if (err instanceof MailNotSent) {
      throw mailDown(`The mail service could not be reached, so the invitation was not sent again. The earlier link to ${user.email} still works until it expires. Try again in a few minutes.`, err);
    }
    throw err;
  }
  await recordAudit(ctx.db, { actorUserId, action: 'user.resend-invitation', entity: 'user', entityId: id, after: { email: user.email } });
  return { message: `A new invitation was sent to ${user.email}; the earlier link no longer works.` };
}

/** The admin's "send reset link": a 503 with the reason when the mail service cannot take it. */
export async function sendResetLink(ctx: AppContext, id: number, actorUserId: number): Promise<{ message: string }> {
  const user = await getUser(ctx.db, id);
  if (user.status === 'deactivated') throw AppError.conflict('Reactivate the account before sending a reset link');
  try {
    await mailOneTimeLink(ctx, user, 'reset');
  } catch (err) {
    if (err instanceof MailNotSent) {
      throw mailDown(`The mail service could not be reached, so no reset link was sent to ${user.email}. Links sent earlier still work until they expire. Try again in a few minutes.`, err);
    }
    throw err;
  }
  await recordAudit(ctx.db, { actorUserId, action: 'user.send-reset-link', entity: 'user', entityId: id, after: { email: user.email } });
  return { message: `A reset link was sent to ${user.email}` };
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
      throw AppError.invalid('Only members belong to a farm', [{ path: 'body.farmId', message: 'Leave empty unless the role is member' }]);
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
