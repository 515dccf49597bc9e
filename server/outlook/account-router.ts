import { ACCESS } from '../../shared/roles.js';
import type { Request, Response } from 'express';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import { getSettings } from '../settings/settings-service.js';
import { mailPreferencesSchema, unsubscribeParamSchema } from '../../shared/outlook-schemas.js';
import { MAIL_STYLE } from '../mail/mail-style.js';
import { mailPreferences, setOptOut, unsubscribeMember } from './mail-preferences-service.js';

/** `/api/account`: the member's own mail preferences. */
export function accountMailRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/mail-preferences', access: ACCESS.myFarm, handler: async (req, res) => res.json(await mailPreferences(ctx.db, req.user!.id)) },
    {
      method: 'put',
      path: '/mail-preferences',
      access: ACCESS.myFarm,
      handler: async (req, res) => {
        const body = parse(mailPreferencesSchema, req.body, 'body');
        await setOptOut(ctx.db, req.user!.id, !body.outlookEmails, body.outlookEmails ? 'mail.subscribe' : 'mail.unsubscribe');
        res.json(await mailPreferences(ctx.db, req.user!.id));
      },
    },
  ];
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function page(title: string, lines: string[], form?: { action: string; button: string }) {
  const formHtml = form
    ? `<form method="post" action="${escapeHtml(form.action)}"><button type="submit" style="${MAIL_STYLE.button};border:0;font:inherit;font-weight:600;cursor:pointer">${escapeHtml(form.button)}</button></form>`
    : '';
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><meta name="robots" content="noindex"><title>${escapeHtml(title)}</title></head>
<body style="${MAIL_STYLE.body};max-width:560px;margin:48px auto">
<h1 style="${MAIL_STYLE.h1}">${escapeHtml(title)}</h1>${lines.map((l) => `<p>${escapeHtml(l)}</p>`).join('')}${formHtml}</body></html>`;
}

/**
 * `/api/unsubscribe/:token` (public): the link in every outlook e-mail and the RFC 8058 one-click
 * target of its List-Unsubscribe header. The signed token names the member. Opening the link (GET)
 * only shows a confirmation page, so a mail filter that follows links unsubscribes nobody; the
 * page's button, and the one-click POST of a mail program (`List-Unsubscribe=One-Click`), turn the
 * member's outlook e-mails off.
 */
export function unsubscribeRoutes(ctx: AppContext): RouteDef[] {
  const member = (req: Request) => unsubscribeMember(ctx.db, parse(unsubscribeParamSchema, req.params, 'params').token);
  const notFound = (res: Response, wantsJson: boolean) => {
    if (wantsJson) throw AppError.notFound('The unsubscribe link');
    res.status(404).type('html').send(page('This link does not work', ['The unsubscribe link is not valid. Sign in and open your mail preferences to change what you receive.']));
  };
  return [
    {
      method: 'get',
      path: '/:token',
      access: 'public',
      handler: async (req, res) => {
        const wantsJson = req.accepts(['html', 'json']) === 'json';
        const u = await member(req);
        if (!u) return notFound(res, wantsJson);
        if (wantsJson) {
          res.json({ email: u.email, outlookEmails: !u.optOut });
          return;
        }
        const { coopName } = await getSettings(ctx.db);
        res.setHeader('Cache-Control', 'no-store');
        if (u.optOut) {
          res.type('html').send(page('Outlook e-mails are already off', [`${u.email} receives no season outlook e-mails from ${coopName}.`, 'To receive them again, sign in and turn them on in your mail preferences.']));
          return;
        }
        res
          .type('html')
          .send(
            page(
              'Stop the outlook e-mails?',
              [`${u.email} receives the season outlook e-mails of ${coopName}. Press the button to stop them.`, 'Published outlooks stay readable in the member portal, and you can turn the e-mails on again in your mail preferences.'],
              { action: req.originalUrl, button: 'Stop outlook e-mails' },
            ),
          );
      },
    },
    {
      method: 'post',
      path: '/:token',
      access: 'public',
      handler: async (req, res) => {
        const oneClick = (req.body as Record<string, unknown> | undefined)?.['List-Unsubscribe'] === 'One-Click';
        const wantsJson = oneClick || req.accepts(['html', 'json']) === 'json';
        const u = await member(req);
        if (!u) return notFound(res, wantsJson);
        await setOptOut(ctx.db, u.id, true, oneClick ? 'mail.unsubscribe-one-click' : 'mail.unsubscribe-link');
        if (wantsJson) {
          res.json({ email: u.email, outlookEmails: false });
          return;
        }
        const { coopName } = await getSettings(ctx.db);
        res
          .type('html')
          .send(page('You will get no more outlook e-mails', [`${u.email} will no longer receive the season outlook e-mails of ${coopName}.`, 'Published outlooks stay readable in the member portal. To receive the e-mails again, sign in and turn them on in your mail preferences.']));
      },
    },
  ];
}
