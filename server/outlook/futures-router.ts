import { ACCESS } from '../../shared/roles.js';
import { futuresListQuerySchema, futuresQuoteSchema } from '../../shared/outlook-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { createRoute, deleteRoute, replaceRoute } from '../core/write-routes.js';
import type { AppContext } from '../context.js';
import { createQuote, deleteQuote, listQuotes, updateQuote } from './futures-service.js';

/** `/api/futures-quotes`: the futures history for the futures-plus-basis expectation (planner edits, readers read). */
export function futuresRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      access: ACCESS.outlook,
      handler: async (req, res) => res.json(await listQuotes(ctx.db, parse(futuresListQuerySchema, req.query, 'query'))),
    },
    createRoute(ACCESS.outlookWrite, futuresQuoteSchema, (body, actor) => createQuote(ctx.db, body, actor)),
    replaceRoute(ACCESS.outlookWrite, futuresQuoteSchema, (id, body, actor) => updateQuote(ctx.db, id, body, actor)),
    deleteRoute(ACCESS.outlookWrite, (id, actor) => deleteQuote(ctx.db, id, actor)),
  ];
}
