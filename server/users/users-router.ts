import { idParamSchema, invitationSchema, userPatchSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import { sendPasswordReset } from '../auth/auth-router.js';
import { getUser, inviteUser, listUsers, updateUser } from './users-service.js';

export function usersRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: ['admin'], handler: async (_req, res) => res.json(await listUsers(ctx.db)) },
    {
      method: 'post',
      path: '/invitations',
      access: ['admin'],
      handler: async (req, res) => {
        const body = parse(invitationSchema, req.body, 'body');
        res.status(201).json(await inviteUser(ctx, body, req.user!.id));
      },
    },
    {
      method: 'patch',
      path: '/:id',
      access: ['admin'],
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const body = parse(userPatchSchema, req.body, 'body');
        res.json(await updateUser(ctx.db, id, body, req.user!.id));
      },
    },
    {
      method: 'post',
      path: '/:id/password-reset',
      access: ['admin'],
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const user = await getUser(ctx.db, id);
        if (user.status === 'deactivated') throw AppError.conflict('Reactivate the account before sending a reset link');
        await sendPasswordReset(ctx, user.id, user.email, user.name);
        res.status(202).json({ message: `A reset link was sent to ${user.email}` });
      },
    },
  ];
}
