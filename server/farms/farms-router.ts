import { ACCESS } from '../../shared/roles.js';
import type { RouteDef } from '../core/routes.js';
import type { AppContext } from '../context.js';
import { listFarms, myFarm } from './farms-repository.js';

export function farmsRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/farms',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => res.json(await listFarms(ctx.db, req.user!)),
    },
    { method: 'get', path: '/my-farm', access: ACCESS.myFarm, cache: true, handler: async (req, res) => res.json(await myFarm(ctx.db, req.user!.farmId)) },
  ];
}
