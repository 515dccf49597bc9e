import { ACCESS } from '../../shared/roles.js';
import { evaluateQuerySchema, modelCreateSchema } from '../../shared/model-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { actionRoute, createRoute, deleteRoute, idOf, jobRoute } from '../core/write-routes.js';
import type { AppContext } from '../context.js';
import { cancelRun, createModel, deleteModel, evaluateRun, getModel, getRun, getRunStatus, getRunWithAuthor, listModels, rerun, startRun } from './models-service.js';

const READ = ACCESS.models;
const WRITE = ACCESS.modelsWrite;

function pairs(s: string | undefined): Record<string, number> | undefined {
  if (!s) return undefined;
  return Object.fromEntries(s.split(',').map((p) => p.split('=')).map(([k, v]) => [k, Number(v)]));
}

export function modelsRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: READ, cache: true, handler: async (_req, res) => res.json(await listModels(ctx.db)) },
    createRoute(WRITE, modelCreateSchema, (body, actor) => createModel(ctx.db, body.name, body.definition, actor)),
    {
      method: 'get',
      path: '/:id',
      access: READ,
      handler: async (req, res) => res.json(await getModel(ctx.db, idOf(req))),
    },
    deleteRoute(WRITE, (id, actor) => deleteModel(ctx.db, id, actor)),
    jobRoute(ctx.jobs, WRITE, '/:id/runs', (id, actor) => startRun(ctx.db, id, actor)),
  ];
}

export function modelRunsRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/:id',
      access: READ,
      handler: async (req, res) => res.json(await getRunWithAuthor(ctx.db, idOf(req))),
    },
    {
      method: 'get',
      path: '/:id/status',
      access: READ,
      handler: async (req, res) => res.json(await getRunStatus(ctx.db, idOf(req))),
    },
    {
      method: 'get',
      path: '/:id/dataset',
      access: READ,
      handler: async (req, res) => {
        const run = await getRun(ctx.db, idOf(req), true);
        res.json({ dataHash: run.dataHash, dataset: (run as { dataset: unknown }).dataset });
      },
    },
    actionRoute(WRITE, '/:id/cancel', (id, actor) => cancelRun(ctx.db, id, actor)),
    jobRoute(ctx.jobs, WRITE, '/:id/rerun', (id, actor) => rerun(ctx.db, id, actor)),
    {
      // Netputs, profit and elasticities at any prices and fixed factors (cheap: no fit).
      method: 'get',
      path: '/:id/evaluate',
      access: READ,
      handler: async (req, res) => {
        const id = idOf(req);
        const q = parse(evaluateQuerySchema, req.query, 'query');
        res.json(await evaluateRun(ctx.db, id, { prices: pairs(q.prices), fixed: pairs(q.fixed) }));
      },
    },
  ];
}
