import { ACCESS } from '../../shared/roles.js';
import { settingsSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { getSettings, saveSettings, serverSetup } from './settings-service.js';

export function settingsRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: 'signed-in', handler: async (_req, res) => res.json(await getSettings(ctx.db)) },
    // How this server is set up (from its environment): the address e-mail links use, and how mail leaves.
    { method: 'get', path: '/server', access: ACCESS.settings, handler: (_req, res) => res.json(serverSetup(ctx)) },
    {
      method: 'put',
      path: '/',
      access: ACCESS.settings,
      handler: async (req, res) => {
        const body = parse(settingsSchema, req.body, 'body');
        res.json(await saveSettings(ctx.db, body, req.user!.id));
      },
    },
  ];
}
