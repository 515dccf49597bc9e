/**
 * The contract part of a member's outlook e-mail (issue 19): their signed contracts of the outlook's
 * season with the estimated marginal cost at the contracted tonnage and the fertiliser it needs,
 * worded as in the portal (shared/contract-words.ts), with the contract caution.
 */
import type { MyContracts } from '../../shared/contracted-view.js';
import { myContractLines } from '../../shared/contract-words.js';
import { MAIL_STYLE } from './mail-style.js';

export interface MailPart {
  text: string;
  html: string;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function contractMailPart(mine: MyContracts): MailPart | null {
  const lines = myContractLines(mine);
  if (!lines.length) return null;
  return {
    text: `Your delivery contracts:\n${lines.map((l) => `  ${l}`).join('\n')}\n${mine.caution}`,
    html: `<h2 style="${MAIL_STYLE.h2}">Your delivery contracts</h2><ul style="${MAIL_STYLE.list}">${lines.map((l) => `<li>${escapeHtml(l)}</li>`).join('')}</ul><p style="${MAIL_STYLE.small}">${escapeHtml(mine.caution)}</p>`,
  };
}
