import { ACCESS } from '../../shared/roles.js';
import type { RouteDef } from '../core/routes.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';

/** The received-mail page's API: development mode only, admins only. */
export function devMailRoutes(ctx: AppContext): RouteDef[] {
  const smtp = () => {
    if (!ctx.fakeSmtp) throw AppError.notFound('The local mailbox');
    return ctx.fakeSmtp;
  };
  return [
    // Asked by the admin screens to decide whether to offer the mailbox page: answers in every mode.
    { method: 'get', path: '/status', access: ACCESS.devMail, handler: (_req, res) => res.json({ available: ctx.config.dev && Boolean(ctx.fakeSmtp) }) },
    { method: 'get', path: '/', access: ACCESS.devMail, devOnly: true, handler: (_req, res) => res.json(smtp().messages().reverse()) },
    {
      method: 'delete',
      path: '/',
      access: ACCESS.devMail,
      devOnly: true,
      handler: (_req, res) => {
        smtp().clear();
        res.status(204).end();
      },
    },
  ];
}
