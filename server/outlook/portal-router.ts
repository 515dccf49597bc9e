import { ACCESS } from '../../shared/roles.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { latestMemberVersion, memberVersion, portalVersions } from './portal-service.js';
import { versionParamSchema } from '../../shared/outlook-schemas.js';

/**
 * `/api/portal`: the member portal. Only published versions exist here, and of the farm figures
 * only the signed-in member's own farm (taken from the session, whatever the request asks for).
 */
export function portalRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/outlook',
      access: ACCESS.myFarm,
      cache: true,
      // Nothing published yet is a normal state: 204 No Content, not a 404 for the browser to log.
      handler: async (req, res) => {
        const latest = await latestMemberVersion(ctx.db, req.user!.farmId);
        if (latest) res.json(latest);
        else res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/outlook/versions',
      access: ACCESS.myFarm,
      cache: true,
      handler: async (_req, res) => res.json(await portalVersions(ctx.db)),
    },
    {
      method: 'get',
      path: '/outlook/versions/:versionId',
      access: ACCESS.myFarm,
      cache: true,
      handler: async (req, res) => res.json(await memberVersion(ctx.db, req.user!.farmId, parse(versionParamSchema, req.params, 'params').versionId)),
    },
  ];
}
