import { ACCESS } from '../../shared/roles.js';
import { idParamSchema, invitationSchema, userPatchSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
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
        const { id } = parse(idParamSchema, req.params, 'params');
        const body = parse(userPatchSchema, req.body, 'body');
        res.json(await updateUser(ctx.db, id, body, req.user!.id));
      },
    },
    {
      method: 'post',
      path: '/:id/password-reset',
      access: ACCESS.users,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        res.status(202).json(await sendResetLink(ctx, id, req.user!.id));
      },
    },
    {
      method: 'post',
      path: '/:id/invitation',
      access: ACCESS.users,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        res.status(202).json(await resendInvitation(ctx, id, req.user!.id));
      },
    },
  ];
}
