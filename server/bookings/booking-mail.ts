/**
 * E-mails of member bookings, written to the outbox (server/mail/outbox.ts) in the same transaction
 * as the change that calls for them. Each key is unique per event (a booking version, a payment, a
 * refund, a member and round), so each goes out once however often the event is seen.
 */
import type { Db } from '../db/client.js';
import { MAIL_STYLE } from '../mail/mail-style.js';
import { enqueueMail, mailDomain } from '../mail/outbox.js';
import { getSettings } from '../settings/settings-service.js';
import { formatMinor } from '../../shared/booking-money.js';
import type { BookingLine } from '../../shared/booking-types.js';

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export const BOOKING_PATH = '/my-farm/bookings';

export interface BookingMailContext {
  publicUrl: string;
  mailFrom: string;
}

interface MailFacts {
  to: string;
  name: string;
  userId: number | null;
  key: string;
  kind: string;
  subject: string;
  paragraphs: string[];
  table?: string[][];
  skipReason?: string;
}

async function queue(db: Db, c: BookingMailContext, f: MailFacts) {
  const coop = (await getSettings(db)).coopName;
  const link = `${c.publicUrl}${BOOKING_PATH}`;
  const tableText = f.table ? f.table.map((r) => r.join('  ')).join('\n') : '';
  const text = [`Hello ${f.name},`, ...f.paragraphs, tableText, `Your booking: ${link}`, `${coop} · sent by Netput`].filter(Boolean).join('\n\n');
  const tableHtml = f.table
    ? `<table style="border-collapse:collapse">${f.table.map((r) => `<tr>${r.map((c) => `<td style="padding:2px 12px 2px 0">${esc(c)}</td>`).join('')}</tr>`).join('')}</table>`
    : '';
  const html = `<!doctype html><html><body style="${MAIL_STYLE.body};max-width:560px">
<h1 style="${MAIL_STYLE.h1}">${esc(f.subject)}</h1>
<p>Hello ${esc(f.name)},</p>
${f.paragraphs.map((p) => `<p>${esc(p)}</p>`).join('\n')}
${tableHtml}
<p><a href="${esc(link)}" style="${MAIL_STYLE.button}">Open your booking</a></p>
<p style="${MAIL_STYLE.footer}">${esc(coop)} · sent by Netput.</p>
</body></html>`;
  await enqueueMail(
    db,
    [{ idempotencyKey: f.key, kind: f.kind, userId: f.userId, to: f.to, subject: f.subject, text, html, skipReason: f.skipReason }],
    mailDomain(c.mailFrom),
  );
}

function linesTable(lines: BookingLine[], currency: string) {
  return lines.map((l) => [l.name, `${(l.kg / 1000).toLocaleString('en-GB', { maximumFractionDigits: 3 })} t`, formatMinor(l.listMinor, currency)]);
}

export interface BookingFacts {
  id: number;
  version: number;
  season: string;
  deliveryMonth: string;
  currency: string;
  lines: BookingLine[];
  listMinor: number;
  discountMinor: number;
  vatMinor: number;
  vatBp: number;
  totalMinor: number;
  deadline: string;
}

export interface Recipient {
  email: string;
  name: string;
}

/**
 * Booking confirmation (one per booking version). Transactional: it goes to the member who booked
 * whatever their outlook-mail preference (userId is left off so the outbox does not skip it).
 */
export function bookingConfirmationMail(db: Db, c: BookingMailContext, to: Recipient, b: BookingFacts) {
  const m = (v: number) => formatMinor(v, b.currency);
  return queue(db, c, {
    to: to.email,
    name: to.name,
    userId: null,
    key: `booking-${b.id}-v${b.version}-confirmation`,
    kind: 'booking-confirmation',
    subject: b.version === 1 ? `Your fertiliser booking for ${b.season}` : `Your changed fertiliser booking for ${b.season}`,
    paragraphs: [
      `${b.version === 1 ? 'We have your booking' : 'We have your changed booking'} (number ${b.id}) for delivery in ${b.deliveryMonth}:`,
      `List value ${m(b.listMinor)}, early-payment discount ${m(b.discountMinor)}, VAT ${(b.vatBp / 100).toLocaleString('en-GB')} % ${m(b.vatMinor)}, total ${m(b.totalMinor)}.`,
      b.discountMinor > 0 ? `The discount applies when you prepay by ${b.deadline}. Until then you can change or cancel the booking in Netput.` : `The booking is firm.`,
    ],
    table: linesTable(b.lines, b.currency),
  });
}

export function paymentReceiptMail(db: Db, c: BookingMailContext, to: Recipient, b: BookingFacts, payment: { id: number; amountMinor: number; paidAt: Date }) {
  return queue(db, c, {
    to: to.email,
    name: to.name,
    userId: null,
    key: `booking-payment-${payment.id}-receipt`,
    kind: 'booking-receipt',
    subject: `Receipt: prepayment of booking ${b.id}`,
    paragraphs: [
      `We received your prepayment of ${formatMinor(payment.amountMinor, b.currency)} on ${payment.paidAt.toISOString().slice(0, 10)} for booking ${b.id} (${b.season}, delivery ${b.deliveryMonth}).`,
      `It includes VAT of ${formatMinor(b.vatMinor, b.currency)} and an early-payment discount of ${formatMinor(b.discountMinor, b.currency)}.`,
      `You can cancel with a full refund until ${b.deadline}; after that the booking is firm.`,
    ],
    table: linesTable(b.lines, b.currency),
  });
}

export function refundMail(db: Db, c: BookingMailContext, to: Recipient, b: BookingFacts, payment: { id: number; amountMinor: number }) {
  return queue(db, c, {
    to: to.email,
    name: to.name,
    userId: null,
    key: `booking-payment-${payment.id}-refund`,
    kind: 'booking-refund',
    subject: `Refund of booking ${b.id}`,
    paragraphs: [`Booking ${b.id} (${b.season}) is cancelled and ${formatMinor(payment.amountMinor, b.currency)} is refunded to the card or account you paid with. Banks usually take a few days to show it.`],
  });
}

export function cancellationMail(db: Db, c: BookingMailContext, to: Recipient, b: BookingFacts) {
  return queue(db, c, {
    to: to.email,
    name: to.name,
    userId: null,
    key: `booking-${b.id}-cancelled`,
    kind: 'booking-cancelled',
    subject: `Booking ${b.id} cancelled`,
    paragraphs: [`Your booking ${b.id} for ${b.season} is cancelled. Nothing was charged for it.`],
  });
}

/** The reminder before the discount deadline; respects the member's mail preference. */
export function reminderMail(db: Db, c: BookingMailContext, to: Recipient & { userId: number; optOut: boolean }, round: { id: number; season: string; deadline: string; discountBp: number }) {
  return queue(db, c, {
    to: to.email,
    name: to.name,
    userId: to.userId,
    key: `booking-round-${round.id}-reminder-${to.userId}`,
    kind: 'booking-reminder',
    subject: `Booking for ${round.season} closes for the discount on ${round.deadline}`,
    paragraphs: [
      `Your farm has not booked its fertiliser for ${round.season} yet.`,
      round.discountBp > 0
        ? `Bookings prepaid by ${round.deadline} earn a ${(round.discountBp / 100).toLocaleString('en-GB')} % early-payment discount.`
        : `Bookings can be changed or cancelled until ${round.deadline}.`,
      'Netput suggests quantities from your farm’s projected nutrient need; rates follow soil tests, local guidance and nutrient-management rules, and a certified adviser has the last word.',
    ],
    skipReason: to.optOut ? 'The member opted out of these e-mails' : undefined,
  });
}
