import { ACCESS } from '../../shared/roles.js';
import { evaluateQuerySchema, modelCreateSchema } from '../../shared/model-schemas.js';
import { idParamSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { createRoute, deleteRoute } from '../core/write-routes.js';
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
      handler: async (req, res) => res.json(await getModel(ctx.db, parse(idParamSchema, req.params, 'params').id)),
    },
    deleteRoute(WRITE, (id, actor) => deleteModel(ctx.db, id, actor)),
    {
      method: 'post',
      path: '/:id/runs',
      access: WRITE,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const run = await startRun(ctx.db, id, req.user!.id);
        ctx.jobs?.poke();
        res.status(202).json(run);
      },
    },
  ];
}

export function modelRunsRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/:id',
      access: READ,
      handler: async (req, res) => res.json(await getRunWithAuthor(ctx.db, parse(idParamSchema, req.params, 'params').id)),
    },
    {
      method: 'get',
      path: '/:id/status',
      access: READ,
      handler: async (req, res) => res.json(await getRunStatus(ctx.db, parse(idParamSchema, req.params, 'params').id)),
    },
    {
      method: 'get',
      path: '/:id/dataset',
      access: READ,
      handler: async (req, res) => {
        const run = await getRun(ctx.db, parse(idParamSchema, req.params, 'params').id, true);
        res.json({ dataHash: run.dataHash, dataset: (run as { dataset: unknown }).dataset });
      },
    },
    {
      method: 'post',
      path: '/:id/cancel',
      access: WRITE,
      handler: async (req, res) => res.json(await cancelRun(ctx.db, parse(idParamSchema, req.params, 'params').id, req.user!.id)),
    },
    {
      method: 'post',
      path: '/:id/rerun',
      access: WRITE,
      handler: async (req, res) => {
        const run = await rerun(ctx.db, parse(idParamSchema, req.params, 'params').id, req.user!.id);
        ctx.jobs?.poke();
        res.status(202).json(run);
      },
    },
    {
      // Netputs, profit and elasticities at any prices and fixed factors (cheap: no fit).
      method: 'get',
      path: '/:id/evaluate',
      access: READ,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const q = parse(evaluateQuerySchema, req.query, 'query');
        res.json(await evaluateRun(ctx.db, id, { prices: pairs(q.prices), fixed: pairs(q.fixed) }));
      },
    },
  ];
}
