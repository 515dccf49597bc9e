import { ACCESS } from '../../shared/roles.js';
import { z } from 'zod';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { listAudit } from './audit-repository.js';

const querySchema = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
  offset: z.coerce.number().int().min(0).max(1e9).default(0),
  /** Only entries about one kind of record, e.g. `price`, `farm-record` (the data pages link with it). */
  entity: z.string().regex(/^[a-z][a-z-]{0,39}$/, 'Name an entity such as price or farm-record').optional(),
});

export function auditRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      access: ACCESS.audit,
      handler: async (req, res) => {
        const q = parse(querySchema, req.query, 'query');
        res.json(await listAudit(ctx.db, q.limit, q.offset, q.entity));
      },
    },
  ];
}
