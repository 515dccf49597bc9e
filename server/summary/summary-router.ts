import { ACCESS } from '../../shared/roles.js';
import type { RouteDef } from '../core/routes.js';
import type { AppContext } from '../context.js';
import { coopSummary } from './summary-service.js';

export function summaryRoutes(ctx: AppContext): RouteDef[] {
  return [{ method: 'get', path: '/', access: ACCESS.coopSummary, cache: true, handler: async (req, res) => res.json(await coopSummary(ctx.db, req.user!.role)) }];
}
