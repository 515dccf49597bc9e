/** Reading and changing a member's outlook e-mail choice (preferences page and unsubscribe link), audited. */
import { AppError } from '../core/app-error.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import { findMailChoice, setMailOptOut } from './mail-preferences-repository.js';
import { unsubscribeSecret, verifyUnsubscribe } from './unsubscribe-token.js';

/** The member an unsubscribe link's token names (address and choice), or undefined when the token is not ours or the account is gone. */
export async function unsubscribeMember(db: Db, token: string) {
  const userId = verifyUnsubscribe(await unsubscribeSecret(db), token);
  return userId !== null ? findMailChoice(db, userId) : undefined;
}

export async function mailPreferences(db: Db, userId: number) {
  const u = await findMailChoice(db, userId);
  if (!u) throw AppError.notFound('The account');
  return { email: u.email, outlookEmails: !u.optOut };
}

/** Turns the member's outlook e-mails off (`optOut`) or on; `action` names how, for the audit log. */
export async function setOptOut(db: Db, userId: number, optOut: boolean, action: string): Promise<void> {
  await db.transaction(async (tx) => {
    const before = await findMailChoice(tx, userId);
    if (!before) throw AppError.notFound('The account');
    await setMailOptOut(tx, userId, optOut);
    await recordAudit(tx, { actorUserId: userId, action, entity: 'user', entityId: userId, before: { mailOptOut: before.optOut }, after: { mailOptOut: optOut } });
  });
}
