import { z } from 'zod';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { listAudit } from './audit-repository.js';

const querySchema = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
  offset: z.coerce.number().int().min(0).default(0),
});

export function auditRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      access: ['admin', 'planner'],
      handler: async (req, res) => {
        const q = parse(querySchema, req.query, 'query');
        res.json(await listAudit(ctx.db, q.limit, q.offset));
      },
    },
  ];
}
