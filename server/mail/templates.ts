import { MAIL_STYLE } from './mail-style.js';
import type { OutgoingMail } from './mailer.js';

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function layout(title: string, paragraphs: string[], link: { href: string; label: string }, coopName: string): string {
  return `<!doctype html><html><head><meta name="viewport" content="width=device-width, initial-scale=1"><meta charset="utf-8"></head><body style="${MAIL_STYLE.body}"><div style="${MAIL_STYLE.column};max-width:560px">
<h1 style="${MAIL_STYLE.h1}">${escapeHtml(title)}</h1>
${paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`).join('\n')}
<p><a href="${escapeHtml(link.href)}" style="${MAIL_STYLE.button}">${escapeHtml(link.label)}</a></p>
<p style="${MAIL_STYLE.footer}">${escapeHtml(coopName)} · sent by Netput. If you did not expect this message, you can ignore it.</p>
</div></body></html>`;
}

export function invitationMail(to: string, name: string, role: string, link: string, coopName: string, days: number): OutgoingMail {
  const lines = [
    `Hello ${name},`,
    `You have been invited to ${coopName}'s Netput as ${role}.`,
    `Choose your password with the link below. It works once and expires in ${days} days.`,
  ];
  return {
    to,
    subject: `Your invitation to ${coopName} on Netput`,
    text: `${lines.join('\n\n')}\n\n${link}\n\n${coopName} · sent by Netput`,
    html: layout(`Welcome to ${coopName}`, lines, { href: link, label: 'Choose a password' }, coopName),
  };
}

export function passwordResetMail(to: string, name: string, link: string, coopName: string, hours: number): OutgoingMail {
  const lines = [
    `Hello ${name},`,
    `Someone asked to reset the password of your Netput account at ${coopName}.`,
    `Choose a new password with the link below. It works once and expires in ${hours} hours. If it was not you, ignore this message; your password stays as it is.`,
  ];
  return {
    to,
    subject: `Reset your Netput password`,
    text: `${lines.join('\n\n')}\n\n${link}\n\n${coopName} · sent by Netput`,
    html: layout('Reset your password', lines, { href: link, label: 'Choose a new password' }, coopName),
  };
}
