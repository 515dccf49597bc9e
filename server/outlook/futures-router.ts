import { ACCESS } from '../../shared/roles.js';
import { idParamSchema } from '../../shared/schemas.js';
import { futuresListQuerySchema, futuresQuoteSchema } from '../../shared/outlook-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
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
    {
      method: 'post',
      path: '/',
      access: ACCESS.outlookWrite,
      handler: async (req, res) => res.status(201).json(await createQuote(ctx.db, parse(futuresQuoteSchema, req.body, 'body'), req.user!.id)),
    },
    {
      method: 'put',
      path: '/:id',
      access: ACCESS.outlookWrite,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        res.json(await updateQuote(ctx.db, id, parse(futuresQuoteSchema, req.body, 'body'), req.user!.id));
      },
    },
    {
      method: 'delete',
      path: '/:id',
      access: ACCESS.outlookWrite,
      handler: async (req, res) => {
        await deleteQuote(ctx.db, parse(idParamSchema, req.params, 'params').id, req.user!.id);
        res.status(204).end();
      },
    },
  ];
}
