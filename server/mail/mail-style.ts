import { COLOUR, FONT, RADIUS, SPACE } from '../../shared/design-tokens.js';

/**
 * Inline styles of Netput's e-mails and plain server pages, from the design tokens the app draws
 * with (shared/design-tokens.ts), so a message looks like the screens it links to. Mail clients
 * ignore style sheets, hence one style attribute per element. Font names keep their single quotes,
 * so the values sit inside double-quoted attributes.
 */
export const MAIL_STYLE = {
  body: `font-family:${FONT.text};color:${COLOUR.loam};background:${COLOUR.paper};margin:0;padding:${SPACE.m}px;-webkit-text-size-adjust:100%`,
  /** One column as wide as the screen up to 640 px: a phone reads it without scrolling sideways. */
  column: `max-width:640px;width:100%;margin:0 auto;box-sizing:border-box;overflow-wrap:break-word;word-wrap:break-word`,
  table: `border-collapse:collapse;font-size:14px;width:100%;max-width:640px`,
  small: `font-size:12px;color:${COLOUR.loamSoft};font-weight:400`,
  list: `padding-left:${SPACE.l}px;margin-left:0`,
  h1: `font-family:${FONT.heading};font-size:22px;font-weight:600;color:${COLOUR.fieldDeep};border-bottom:3px solid ${COLOUR.fieldDeep};padding-bottom:${SPACE.s}px;margin:0 0 ${SPACE.l}px`,
  h2: `font-family:${FONT.heading};font-size:17px;font-weight:600;color:${COLOUR.fieldDeep};margin:${SPACE.xl}px 0 ${SPACE.s}px`,
  th: `text-align:left;padding:4px 8px;border-bottom:2px solid ${COLOUR.field};color:${COLOUR.fieldDeep}`,
  td: `padding:4px 8px;border-bottom:1px dotted ${COLOUR.furrow}`,
  tdNumber: `padding:4px 8px;border-bottom:1px dotted ${COLOUR.furrow};text-align:right;white-space:nowrap;font-variant-numeric:tabular-nums`,
  note: `font-size:13px;color:${COLOUR.loamSoft};border-left:4px solid ${COLOUR.grain};background:${COLOUR.grainWash};padding:${SPACE.s}px ${SPACE.m}px ${SPACE.s}px ${SPACE.xl}px`,
  button: `display:inline-block;background:${COLOUR.field};color:#ffffff;padding:10px 18px;border-radius:${RADIUS.control}px;text-decoration:none;font-weight:600`,
  footer: `color:${COLOUR.loamSoft};font-size:12px;border-top:1px solid ${COLOUR.furrow};padding-top:${SPACE.s}px;margin-top:${SPACE.xl}px`,
} as const;
