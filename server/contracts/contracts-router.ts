import { z } from 'zod';
import { idListSchema } from '../../shared/ids.js';
import { CONTRACT_STATUSES, contractSchema } from '../../shared/contract-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { createRoute, deleteRoute, idOf, replaceRoute, versionField } from '../core/write-routes.js';
import type { AppContext } from '../context.js';
import { ACCESS } from '../../shared/roles.js';
import { contractedState, myContracts, startContracted } from './contracted-service.js';
import { getContract, listContracts } from './contracts-repository.js';
import { createContract, deleteContract, updateContract } from './contracts-service.js';

/** Planners and administrators keep contracts; the treasurer reads them; a member reads their own farm's. */
const READ = [...ACCESS.contracts, ...ACCESS.myFarm];
const WRITE = ACCESS.contractsEdit;
/** The contracted view of an outlook: whoever reads full outlooks may look and (re)compute it. */
const EVALUATE = ACCESS.contracts;

const listQuery = z.object({
  farms: idListSchema,
  seasons: idListSchema,
  items: idListSchema,
  status: z
    .string()
    .regex(new RegExp(`^(${CONTRACT_STATUSES.join('|')})(,(${CONTRACT_STATUSES.join('|')}))*$`), `Use statuses from: ${CONTRACT_STATUSES.join(', ')}`)
    .transform((s) => s.split(',') as (typeof CONTRACT_STATUSES)[number][])
    .optional(),
});
const updateSchema = contractSchema.and(z.object({ version: versionField('contract', 'GET /api/contracts') }));

export function contractsRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      // A member's own contracts with their farm's estimated marginal cost and fertiliser need.
      method: 'get',
      path: '/mine',
      access: ACCESS.myFarm,
      handler: async (req, res) => res.json(await myContracts(ctx.db, req.user!)),
    },
    {
      method: 'get',
      path: '/outlooks/:id/evaluation',
      access: EVALUATE,
      handler: async (req, res) => {
        const id = idOf(req);
        res.json(await contractedState(ctx.db, id));
      },
    },
    {
      // Queues the evaluation (worker thread); poll the GET for progress and the view.
      method: 'post',
      path: '/outlooks/:id/evaluation',
      access: EVALUATE,
      handler: async (req, res) => {
        const id = idOf(req);
        res.status(202).json(await startContracted(ctx.db, id));
      },
    },
    {
      method: 'get',
      path: '/',
      access: READ,
      cache: true,
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listContracts(ctx.db, { farmIds: q.farms, seasonIds: q.seasons, itemIds: q.items, statuses: q.status }, req.user!));
      },
    },
    {
      method: 'get',
      path: '/:id',
      access: READ,
      cache: true,
      handler: async (req, res) => {
        const id = idOf(req);
        res.json(await getContract(ctx.db, id, req.user!));
      },
    },
    createRoute(WRITE, contractSchema, (body, actor) => createContract(ctx.db, body, actor)),
    replaceRoute(WRITE, updateSchema, (id, { version, ...body }, actor) => updateContract(ctx.db, id, body, version, actor)),
    deleteRoute(WRITE, (id, actor) => deleteContract(ctx.db, id, actor)),
  ];
}
