import { eq } from 'drizzle-orm';
import { evaluateQuerySchema, modelCreateSchema } from '../../shared/model-schemas.js';
import { idParamSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import { models, users } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';
import { elasticitiesAt, evaluateFit, isEstimationInputError, type FitResult } from '../estimation/index.js';
import { cancelRun, createModel, getModel, getRun, getRunStatus, listModels, rerun, startRun } from './models-service.js';

const READ = ['admin', 'planner', 'treasurer'] as const;
const WRITE = ['planner'] as const;

function pairs(s: string | undefined): Record<string, number> | undefined {
  if (!s) return undefined;
  return Object.fromEntries(s.split(',').map((p) => p.split('=')).map(([k, v]) => [k, Number(v)]));
}

export function modelsRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: READ, cache: true, handler: async (_req, res) => res.json(await listModels(ctx.db)) },
    {
      method: 'post',
      path: '/',
      access: WRITE,
      handler: async (req, res) => {
        const body = parse(modelCreateSchema, req.body, 'body');
        res.status(201).json(await createModel(ctx.db, body.name, body.definition, req.user!.id));
      },
    },
    {
      method: 'get',
      path: '/:id',
      access: READ,
      handler: async (req, res) => res.json(await getModel(ctx.db, parse(idParamSchema, req.params, 'params').id)),
    },
    {
      method: 'delete',
      path: '/:id',
      access: WRITE,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const before = await getModel(ctx.db, id);
        await ctx.db.transaction(async (tx) => {
          await tx.delete(models).where(eq(models.id, id));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'model.delete', entity: 'model', entityId: id, before: { name: before.name, definition: before.definition } });
        });
        res.status(204).end();
      },
    },
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
  const succeeded = async (id: number) => {
    const run = await getRun(ctx.db, id);
    if (run.status !== 'succeeded' || !run.result) throw AppError.conflict(`The run has not succeeded (it is ${run.status})`);
    return (run.result as { fit: FitResult }).fit;
  };
  return [
    {
      method: 'get',
      path: '/:id',
      access: READ,
      handler: async (req, res) => {
        const run = await getRun(ctx.db, parse(idParamSchema, req.params, 'params').id);
        // Who started it, by name, for the result page's provenance (treasurers cannot list users).
        const [by] = run.createdBy === null ? [] : await ctx.db.select({ name: users.name }).from(users).where(eq(users.id, run.createdBy));
        res.json({ ...run, createdByName: by?.name ?? null });
      },
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
        const fit = await succeeded(id);
        const point = { prices: pairs(q.prices), fixed: pairs(q.fixed) };
        try {
          const ev = evaluateFit(fit, point);
          const el = elasticitiesAt(fit, point);
          res.json({ items: fit.layout.items, point: ev.point, netputs: ev.netputs, profit: ev.profit, convex: ev.convex, elasticities: el.elasticities, standardErrors: el.standardErrors });
        } catch (err) {
          if (isEstimationInputError(err)) throw AppError.unprocessable((err as Error).message);
          throw err;
        }
      },
    },
  ];
}
