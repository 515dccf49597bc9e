/**
 * The personal outlook e-mail: HTML and plain text with the member's own farm figures, the co-op
 * totals, the expected prices, the planner's commentary, the cautions, a link to the portal and a
 * one-click unsubscribe link. It only shows numbers it is given; it computes none.
 */
import { dayText, priceText, quantityText } from '../../shared/number-format.js';
import { bandCoverWords, SCENARIO_WORDS } from '../../shared/band-words.js';
import type { FarmOutlook, ItemProjection, OutlookSnapshot } from '../../shared/outlook-types.js';
import { MAIL_STYLE } from './mail-style.js';
import type { MailPart } from './contract-mail.js';

export interface OutlookMailQuantity {
  name: string;
  unit: string;
  role: 'output' | 'input';
  /** Base scenario: point projection and the 5–95% band. */
  point: number;
  p5: number;
  p95: number;
  /** Point projections of the low and high scenarios. */
  low: number;
  high: number;
}

export interface OutlookMailInput {
  to: string;
  recipientName: string;
  coopName: string;
  season: string;
  version: number;
  title: string;
  publishedOn: string;
  prices: { name: string; priceUnit: string; low: number; base: number; high: number; method: string }[];
  farm: { code: string; name: string; fixed: string; items: OutlookMailQuantity[] } | null;
  coop: OutlookMailQuantity[];
  deliveries: { point: number; p5: number; p95: number; storageShare: number | null; handlingDays: number | null } | null;
  /** How the low and high scenarios are made, in words. */
  scenarioRule: string;
  /** What the likely range covers, in words (shared/band-words.ts). */
  bandWords: string;
  commentary: string;
  /** The member's delivery contracts with their estimated marginal cost (server/mail/contract-mail.ts), when they have any. */
  contracts?: MailPart | null;
  cautions: string[];
  portalUrl: string;
  unsubscribeUrl: string;
}

const nf0 = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });

/** As on the screens (shared/number-format.ts): four significant figures from 10,000 up. */
export const fmtQuantity = quantityText;
/** A price as on the screens (shared/number-format.ts). */
export const fmtMoney = priceText;

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

const band = (q: OutlookMailQuantity) => `${fmtQuantity(q.p5)}–${fmtQuantity(q.p95)}`;

function quantityLines(rows: OutlookMailQuantity[]): string[] {
  return rows.map(
    (q) => `  ${q.name}: ${fmtQuantity(q.point)} ${q.unit} (likely range ${band(q)}; at low prices ${fmtQuantity(q.low)}, at high prices ${fmtQuantity(q.high)})`,
  );
}

/**
 * Two columns that fit a phone (390 px): the item and its figure, and under the figure the likely
 * range and the low and high price scenarios in small type. No fixed widths anywhere, so the
 * table takes the width of the screen it is read on.
 */
function quantityTable(rows: OutlookMailQuantity[]): string {
  const th = `style="${MAIL_STYLE.th}"`;
  const td = `style="${MAIL_STYLE.td}"`;
  const tdn = `style="${MAIL_STYLE.tdNumber}"`;
  return `<table role="presentation" width="100%" style="${MAIL_STYLE.table}">
<tr><th ${th}>Item</th><th ${th} align="right">Projected</th></tr>
${rows
  .map(
    (q) =>
      `<tr><td ${td}>${escapeHtml(q.name)}</td><td ${tdn}><strong>${fmtQuantity(q.point)} ${escapeHtml(q.unit)}</strong><br><span style="${MAIL_STYLE.small}">likely ${band(q)}<br>low prices ${fmtQuantity(q.low)} · high ${fmtQuantity(q.high)}</span></td></tr>`,
  )
  .join('\n')}
</table>`;
}

export function outlookMail(m: OutlookMailInput): { to: string; subject: string; text: string; html: string } {
  const updated = m.version > 1 ? ` (update ${m.version})` : '';
  const subject = `${m.coopName}: season outlook ${m.season}${updated}`;
  // Members read the prices, not how each was set (the method is in the portal, behind "How this was made").
  const priceLines = m.prices.map((p) => `  ${p.name}: ${fmtMoney(p.base)} ${p.priceUnit} (low ${fmtMoney(p.low)}, high ${fmtMoney(p.high)})`);
  const deliveries = m.deliveries
    ? `Deliveries to the co-op: ${fmtQuantity(m.deliveries.point)} t (likely range ${fmtQuantity(m.deliveries.p5)}–${fmtQuantity(m.deliveries.p95)} t)${
        m.deliveries.storageShare !== null ? `, ${Math.round(100 * m.deliveries.storageShare)}% of the storage capacity` : ''
      }${m.deliveries.handlingDays !== null ? `, about ${nf0.format(m.deliveries.handlingDays)} days of intake at full handling capacity` : ''}.`
    : null;

  const text = [
    `Hello ${m.recipientName},`,
    `${m.coopName} has published its outlook for the ${m.season} season${updated}: "${m.title}" (${m.publishedOn}).`,
    m.farm
      ? `Your farm, ${m.farm.name} (${m.farm.code}, ${m.farm.fixed}), at the expected prices:\n${quantityLines(m.farm.items).join('\n')}`
      : 'No farm is linked to your account, so this message shows the co-op totals only.',
    m.bandWords,
    m.contracts?.text ?? null,
    `The co-op in total:\n${quantityLines(m.coop).join('\n')}${deliveries ? `\n${deliveries}` : ''}`,
    `Expected prices:\n${priceLines.join('\n')}\n${m.scenarioRule}`,
    m.commentary.trim() ? `From the planner:\n${m.commentary.trim()}` : null,
    `Please note:\n${m.cautions.map((c) => `- ${c}`).join('\n')}`,
    `Read the full outlook and your farm's figures in the member portal:\n${m.portalUrl}`,
    `You receive this because you are a member of ${m.coopName}. To stop outlook e-mails, open this link:\n${m.unsubscribeUrl}`,
  ]
    .filter((x): x is string => x !== null)
    .join('\n\n');

  const p = (s: string) => `<p>${escapeHtml(s)}</p>`;
  const html = `<!doctype html><html><head><meta name="viewport" content="width=device-width, initial-scale=1"><meta charset="utf-8"></head><body style="${MAIL_STYLE.body}"><div style="${MAIL_STYLE.column}">
<h1 style="${MAIL_STYLE.h1}">${escapeHtml(`Season outlook ${m.season}${updated}`)}</h1>
${p(`Hello ${m.recipientName},`)}
${p(`${m.coopName} has published its outlook for the ${m.season} season: “${m.title}” (${m.publishedOn}).`)}
${
  m.farm
    ? `<h2 style="${MAIL_STYLE.h2}">Your farm: ${escapeHtml(`${m.farm.name} (${m.farm.code})`)}</h2>${p(`${m.farm.fixed}; figures at the expected prices.`)}${quantityTable(m.farm.items)}`
    : p('No farm is linked to your account, so this message shows the co-op totals only.')
}
<p style="${MAIL_STYLE.small}">${escapeHtml(m.bandWords)}</p>
${m.contracts?.html ?? ''}
<h2 style="${MAIL_STYLE.h2}">The co-op in total</h2>
${quantityTable(m.coop)}
${deliveries ? p(deliveries) : ''}
<h2 style="${MAIL_STYLE.h2}">Expected prices</h2>
<ul style="${MAIL_STYLE.list}">${m.prices.map((x) => `<li>${escapeHtml(`${x.name}: ${fmtMoney(x.base)} ${x.priceUnit} (low ${fmtMoney(x.low)}, high ${fmtMoney(x.high)})`)}</li>`).join('')}</ul>
${p(m.scenarioRule)}
${m.commentary.trim() ? `<h2 style="${MAIL_STYLE.h2}">From the planner</h2>${m.commentary.trim().split(/\n{2,}/).map(p).join('\n')}` : ''}
<h2 style="${MAIL_STYLE.h2}">Please note</h2>
<ul style="${MAIL_STYLE.note};${MAIL_STYLE.list}">${m.cautions.map((c) => `<li>${escapeHtml(c)}</li>`).join('')}</ul>
<p><a href="${escapeHtml(m.portalUrl)}" style="${MAIL_STYLE.button}">Open the outlook</a></p>
<p style="${MAIL_STYLE.footer}">${escapeHtml(`You receive this because you are a member of ${m.coopName}.`)} <a href="${escapeHtml(m.unsubscribeUrl)}">Stop outlook e-mails</a> · sent by Netput</p>
</div></body></html>`;
  return { to: m.to, subject, text, html };
}

function mailQuantities(items: ItemProjection[]): OutlookMailQuantity[] {
  return items.map((i) => ({
    name: i.name,
    unit: i.unit,
    role: i.role,
    point: i.scenarios.base!.point,
    p5: i.scenarios.base!.p5,
    p95: i.scenarios.base!.p95,
    low: i.scenarios.low!.point,
    high: i.scenarios.high!.point,
  }));
}

function fixedText(f: FarmOutlook): string {
  const land = f.fixed.land_ha;
  return land !== undefined ? `${Math.round(land).toLocaleString('en-GB')} ha` : 'at its recorded fixed factors';
}

/** The e-mail of one member from a published version (its frozen snapshot and the member's farm part). */
export function outlookMailOf(
  s: OutlookSnapshot,
  farm: FarmOutlook | null,
  to: { email: string; name: string },
  links: { portalUrl: string; unsubscribeUrl: string },
  contracts: MailPart | null = null,
) {
  const d = s.projection.coop.deliveries?.scenarios.base;
  const cap = s.projection.coop.capacity?.scenarios.base;
  return outlookMail({
    to: to.email,
    recipientName: to.name,
    coopName: s.coopName,
    season: s.season.label,
    version: s.version,
    title: s.title,
    publishedOn: dayText(s.publishedAt),
    prices: s.expectations.map((e) => ({ name: e.name, priceUnit: e.priceUnit, low: e.low, base: e.base, high: e.high, method: e.methodLabel })),
    farm: farm ? { code: farm.code, name: farm.name, fixed: fixedText(farm), items: mailQuantities(farm.items) } : null,
    coop: mailQuantities(s.projection.coop.items),
    deliveries: d ? { point: d.point, p5: d.p5, p95: d.p95, storageShare: cap?.storageShare?.point ?? null, handlingDays: cap?.handlingDays?.point ?? null } : null,
    scenarioRule: SCENARIO_WORDS,
    bandWords: bandCoverWords(s.projection.band ?? null),
    commentary: s.commentary,
    cautions: s.cautions,
    portalUrl: links.portalUrl,
    unsubscribeUrl: links.unsubscribeUrl,
    contracts,
  });
}
