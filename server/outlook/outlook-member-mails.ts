/**
 * The e-mails of a published version: one personal message per active member into the outbox, with
 * the member's own farm part and delivery contracts, a signed unsubscribe link, its one-click
 * List-Unsubscribe headers (RFC 8058) and a List-Id. A member who opted out or has not accepted the
 * invitation gets a row that says why it is skipped. The text itself is `server/mail/outlook-mail.ts`.
 */
import type { Config } from '../config.js';
import type { Db } from '../db/client.js';
import { myContracts } from '../contracts/contracted-service.js';
import { contractMailPart, type MailPart } from '../mail/contract-mail.js';
import { enqueueMail, mailDomain, type NewOutboxMail } from '../mail/outbox.js';
import { outlookMailOf } from '../mail/outlook-mail.js';
import type { FarmOutlook, OutlookSnapshot } from '../../shared/outlook-types.js';
import { signUnsubscribe, unsubscribeSecret } from './unsubscribe-token.js';
import { activeMembers } from './outlook-repository.js';

/** Where the e-mail's portal link points (the member's page with the published outlook). */
export const PORTAL_PATH = '/my-farm/outlook';

/** Queues the version's e-mails (in the caller's transaction); counts those to send and those skipped. */
export async function queueOutlookMails(tx: Db, config: Pick<Config, 'publicUrl' | 'mailFrom'>, s: OutlookSnapshot, versionId: number, farmParts: FarmOutlook[]) {
  const members = await activeMembers(tx);
  const secret = await unsubscribeSecret(tx);
  const byFarm = new Map(farmParts.map((f) => [f.farmId, f]));
  // Each member's delivery contracts of the season, with their farm's figures (issue 19).
  const contractParts = new Map<number, MailPart | null>();
  for (const farmId of new Set(members.map((m) => m.farmId).filter((f): f is number => f !== null))) {
    const mine = await myContracts(tx, { role: 'member', farmId }, s.season.label);
    contractParts.set(farmId, contractMailPart(mine));
  }
  const mails: NewOutboxMail[] = members.map((m) => {
    const key = `outlook.v${versionId}.u${m.id}`;
    const unsubscribeUrl = `${config.publicUrl}/api/unsubscribe/${signUnsubscribe(secret, m.id)}`;
    const farm = m.farmId !== null ? (byFarm.get(m.farmId) ?? null) : null;
    const content = outlookMailOf(s, farm, { email: m.email, name: m.name }, { portalUrl: `${config.publicUrl}${PORTAL_PATH}`, unsubscribeUrl }, m.farmId !== null ? (contractParts.get(m.farmId) ?? null) : null);
    const skipReason = m.optOut ? 'The member has opted out of outlook e-mails' : !m.passwordHash ? 'The member has not accepted the invitation yet' : undefined;
    return {
      idempotencyKey: key,
      kind: 'outlook',
      outlookVersionId: versionId,
      userId: m.id,
      ...content,
      headers: {
        'List-Unsubscribe': `<${unsubscribeUrl}>`,
        'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
        'List-Id': `Season outlooks <outlooks.${mailDomain(config.mailFrom)}>`,
      },
      skipReason,
    };
  });
  await enqueueMail(tx, mails, mailDomain(config.mailFrom));
  return { queued: mails.filter((m) => !m.skipReason).length, skipped: mails.filter((m) => m.skipReason).length };
}
