/**
 * One-time links by e-mail (invitations and password resets), all or nothing: the link's token is
 * stored, the message handed to the mail service, and only then are the account's earlier links of
 * the same kind retired. When the mail service cannot take the message, the new token is removed
 * again and the caller gets `MailNotSent`, so nothing half-done is left behind (issue 15, item 6).
 * These messages are not queued in the outbox: the outbox keeps message bodies in the database, and
 * a link's token must be stored only as a hash.
 */
import type { AppContext } from '../context.js';
import { ROLE_LABELS, type Role } from '../../shared/roles.js';
import { invitationMail, passwordResetMail } from '../mail/templates.js';
import { getSettings } from '../settings/settings-service.js';
import { createToken, dropToken, INVITE_DAYS, RESET_HOURS, retireOtherTokens } from './auth-service.js';

/** The mail service refused or could not be reached; nothing was sent. */
export class MailNotSent extends Error {
  constructor(cause: unknown) {
    super(`The mail service did not accept the message: ${cause instanceof Error ? cause.message : String(cause)}`, { cause });
    this.name = 'MailNotSent';
  }
}

export interface LinkRecipient {
  id: number;
  email: string;
  name: string;
  role: Role;
}

export async function mailOneTimeLink(ctx: AppContext, user: LinkRecipient, purpose: 'invite' | 'reset'): Promise<void> {
  const { id, token } = await createToken(ctx.db, user.id, purpose);
  const { coopName } = await getSettings(ctx.db);
  const mail =
    purpose === 'invite'
      ? invitationMail(user.email, user.name, ROLE_LABELS[user.role].toLowerCase(), `${ctx.config.publicUrl}/invite/${token}`, coopName, INVITE_DAYS)
      : passwordResetMail(user.email, user.name, `${ctx.config.publicUrl}/reset/${token}`, coopName, RESET_HOURS);
  try {
    await ctx.mailer.send(mail);
  } catch (err) {
    await dropToken(ctx.db, id);
    throw new MailNotSent(err);
  }
  await retireOtherTokens(ctx.db, user.id, purpose, id);
}
