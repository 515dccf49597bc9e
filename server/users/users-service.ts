import type { UserStatus, UserSummary } from '../../shared/api-types.js';
import type { Role } from '../../shared/roles.js';
import type { Db } from '../db/client.js';
import type { users } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { AppContext } from '../context.js';
import { mailOneTimeLink, MailNotSent } from '../auth/link-mail.js';
import * as repo from './users-repository.js';

function statusOf(u: { active: boolean; passwordHash: string | null }): UserStatus {
  if (!u.active) return 'deactivated';
  return u.passwordHash ? 'active' : 'invited';
}

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
  const rows = await repo.listUserRows(db);
  return rows.map(toSummary);
}

export async function getUser(db: Db, id: number): Promise<UserSummary> {
  const row = await repo.findUserRow(db, id);
  if (!row) throw AppError.notFound('The user');
  return toSummary(row);
}

/** Links a member to a farm (several members may share one, e.g. a family farm), or unlinks with null. */
async function assignFarm(db: Db, userId: number, farmId: number | null | undefined) {
  if (farmId === undefined) return;
  if (farmId !== null && !(await repo.farmExists(db, farmId))) {
    throw AppError.invalid('The farm does not exist', [{ path: 'body.farmId', message: 'No farm has this id' }]);
  }
  await repo.setUserFarm(db, userId, farmId);
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
    if (await repo.emailTaken(tx, inv.email)) throw AppError.conflict(`An account for ${inv.email} already exists`);
    const created = await repo.insertInvitedUser(tx, { email: inv.email, name: inv.name, role: inv.role });
    await assignFarm(tx, created, inv.farmId ?? undefined);
    return created;
  });
  try {
    await mailOneTimeLink(ctx, { id, email: inv.email, name: inv.name, role: inv.role }, 'invite');
  } catch (err) {
    // Its only token went with the failed message; the account has done nothing yet.
    await repo.deleteUnacceptedUser(ctx.db, id);
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
    if (Object.keys(set).length) await repo.updateUserFields(tx, id, set);
    await assignFarm(tx, id, role !== 'member' ? (before.farmId ? null : undefined) : patch.farmId);
    // A deactivated account, or one whose role changed, signs in again.
    if (patch.active === false || (patch.role && patch.role !== before.role)) await repo.deleteSessionsOf(tx, id);
    const after = await getUser(tx, id);
    await recordAudit(tx, { actorUserId, action: 'user.update', entity: 'user', entityId: id, before, after });
  });
  return getUser(db, id);
}
