import { ACCESS } from '../../shared/roles.js';
import { invitationSchema, userPatchSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { actionRoute, idOf } from '../core/write-routes.js';
import type { AppContext } from '../context.js';
import { inviteUser, listUsers, resendInvitation, sendResetLink, updateUser } from './users-service.js';

export function usersRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: ACCESS.users, handler: async (_req, res) => res.json(await listUsers(ctx.db)) },
    {
      method: 'post',
      path: '/invitations',
      access: ACCESS.users,
      handler: async (req, res) => {
        const body = parse(invitationSchema, req.body, 'body');
        res.status(201).json(await inviteUser(ctx, body, req.user!.id));
      },
    },
    {
      method: 'patch',
      path: '/:id',
      access: ACCESS.users,
      handler: async (req, res) => {
        const id = idOf(req);
        const body = parse(userPatchSchema, req.body, 'body');
        res.json(await updateUser(ctx.db, id, body, req.user!.id));
      },
    },
    actionRoute(ACCESS.users, '/:id/password-reset', (id, actor) => sendResetLink(ctx, id, actor), 202),
    actionRoute(ACCESS.users, '/:id/invitation', (id, actor) => resendInvitation(ctx, id, actor), 202),
  ];
}
