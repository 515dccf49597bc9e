import { ACCESS } from '../../shared/roles.js';
import type { Request, Response } from 'express';
import type { AppContext } from '../context.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { createRoute, deleteRoute, idOf, replaceRoute } from '../core/write-routes.js';
import { budgetExportQuerySchema, budgetInputSchema, budgetViewQuerySchema, fertiliserProductSchema } from '../../shared/budget-schemas.js';
import { budgetCsv, budgetXlsx } from './budget-export.js';
import { budgetForExport, createBudget, deleteBudget, getBudget, listBudgets, previewBudget, unitSystemOf, updateBudget } from './budget-service.js';
import { createProduct, deleteProduct, listProducts, updateProduct } from './fertiliser-products-repository.js';

/** Treasurers write budgets and the product list they plan with; planners and admins read; members nothing. */
const READ = ACCESS.budget;
const WRITE = ACCESS.budgetEdit;

function fileName(id: number, name: string, ext: string): string {
  const slug = name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 60) || 'budget';
  return `budget-${id}-${slug}.${ext}`;
}

function attach(res: Response, type: string, name: string, body: string | Buffer) {
  res.setHeader('Content-Type', type);
  res.setHeader('Content-Disposition', `attachment; filename="${name}"`);
  res.setHeader('Cache-Control', 'no-store');
  res.send(body);
}

/** Mounted at /api/budgets. */
export function budgetsRoutes(ctx: AppContext): RouteDef[] {
  /** The unit system a budget is shown in (`?units=`, else the co-op's setting). */
  const unitsOf = async (req: Request) => unitSystemOf(ctx.db, parse(budgetViewQuerySchema, req.query, 'query').units);
  return [
    { method: 'get', path: '/', access: READ, handler: async (_req, res) => res.json(await listBudgets(ctx.db)) },
    {
      // Computes a budget without saving it, to try inputs out.
      method: 'post',
      path: '/preview',
      access: WRITE,
      handler: async (req, res) => {
        const input = parse(budgetInputSchema, req.body, 'body');
        res.json(await previewBudget(ctx.db, input, await unitsOf(req)));
      },
    },
    {
      method: 'post',
      path: '/',
      access: WRITE,
      handler: async (req, res) => {
        const input = parse(budgetInputSchema, req.body, 'body');
        res.status(201).json(await createBudget(ctx.db, input, req.user!.id, await unitsOf(req)));
      },
    },
    {
      method: 'get',
      path: '/:id',
      access: READ,
      handler: async (req, res) => {
        const id = idOf(req);
        res.json(await getBudget(ctx.db, id, await unitsOf(req)));
      },
    },
    {
      method: 'put',
      path: '/:id',
      access: WRITE,
      handler: async (req, res) => {
        const id = idOf(req);
        const input = parse(budgetInputSchema, req.body, 'body');
        res.json(await updateBudget(ctx.db, id, input, req.user!.id, await unitsOf(req)));
      },
    },
    deleteRoute(WRITE, (id, actor) => deleteBudget(ctx.db, id, actor)),
    {
      method: 'get',
      path: '/:id/export',
      access: READ,
      handler: async (req, res) => {
        const id = idOf(req);
        const q = parse(budgetExportQuerySchema, req.query, 'query');
        const { header, result } = await budgetForExport(ctx.db, id, await unitSystemOf(ctx.db, q.units));
        if (q.format === 'csv') attach(res, 'text/csv; charset=utf-8', fileName(id, header.name, 'csv'), budgetCsv(header, result));
        else attach(res, 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', fileName(id, header.name, 'xlsx'), await budgetXlsx(header, result));
      },
    },
  ];
}

/** Mounted at /api/fertiliser-products: the products budgets plan with. */
export function fertiliserProductsRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: READ, handler: async (_req, res) => res.json(await listProducts(ctx.db)) },
    createRoute(WRITE, fertiliserProductSchema, (body, actor) => createProduct(ctx.db, body, actor)),
    replaceRoute(WRITE, fertiliserProductSchema, (id, body, actor) => updateProduct(ctx.db, id, body, actor)),
    deleteRoute(WRITE, (id, actor) => deleteProduct(ctx.db, id, actor)),
  ];
}
