import { ACCESS } from '../../shared/roles.js';
import { z } from 'zod';
import { idListSchema, idSchema, idTextSchema } from '../../shared/ids.js';
import { priceIndexSchema, priceSchema } from '../../shared/data-schemas.js';
import { priceQuerySchema } from '../../shared/price-query.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { createRoute, deleteRoute, replaceRoute, versionField } from '../core/write-routes.js';
import type { AppContext } from '../context.js';
import { createPrices, deletePrice, deletePrices, exportPrices, pricePage, priceSeries, updatePrice } from './prices-service.js';
import { createPriceIndex, listPriceIndexes, removePriceIndex, updatePriceIndex } from './price-indexes-service.js';
import { CONFIRM_FLAG } from '../../shared/plausibility.js';
import { exportFormatSchema } from '../exports/data-exports.js';

const READ = ACCESS.prices;
const WRITE = ACCESS.dataEdit;

const seriesQuery = z.object({ items: idListSchema, deflator: idTextSchema.optional() });
const confirmSchema = z.boolean({ error: 'Send confirmImplausible as true or false' }).optional();
const blockSchema = z.object({
  rows: z.array(priceSchema).min(1, 'Send at least one row').max(5000, 'Paste at most 5,000 rows at once'),
  [CONFIRM_FLAG]: confirmSchema,
});
const updateSchema = priceSchema.extend({
  version: versionField('price', 'GET /api/prices'),
  [CONFIRM_FLAG]: confirmSchema,
});
const deleteBlockSchema = z.object({
  ids: z
    .array(idSchema)
    .min(1, 'Choose at least one price')
    .max(5000, 'Delete at most 5,000 prices at once')
    .refine((ids) => new Set(ids).size === ids.length, 'A price is listed twice'),
});

export function pricesRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      access: READ,
      cache: true,
      // One window of the table (shared/price-query.ts): never the whole table in one answer.
      handler: async (req, res) => {
        const q = parse(priceQuerySchema, req.query, 'query');
        const page = await pricePage(ctx, q);
        res.setHeader('X-Total-Count', String(page.total));
        res.json(page.rows);
      },
    },
    {
      // The same columns the price import reads, so an export re-imports cleanly.
      method: 'get',
      path: '/export',
      access: READ,
      handler: async (req, res) => {
        const { format } = parse(exportFormatSchema, req.query, 'query');
        await exportPrices(ctx.db, res, format);
      },
    },
    {
      method: 'get',
      path: '/series',
      access: READ,
      cache: true,
      handler: async (req, res) => {
        const q = parse(seriesQuery, req.query, 'query');
        res.json(await priceSeries(ctx.db, q.items ?? [], q.deflator));
      },
    },
    // One row or a pasted block: all rows are written or none.
    createRoute(WRITE, blockSchema, (body, actor) => createPrices(ctx.db, body.rows, actor, body[CONFIRM_FLAG] === true)),
    replaceRoute(WRITE, updateSchema, (id, { version, [CONFIRM_FLAG]: confirmed, ...body }, actor) => updatePrice(ctx.db, id, body, version, actor, confirmed === true)),
    {
      // The rows chosen in the grid: all are deleted or none (an id that is gone refuses the lot).
      method: 'post',
      path: '/deletions',
      access: WRITE,
      handler: async (req, res) => {
        const { ids } = parse(deleteBlockSchema, req.body, 'body');
        await deletePrices(ctx.db, ids, req.user!.id);
        res.json({ deleted: ids.length });
      },
    },
    deleteRoute(WRITE, (id, actor) => deletePrice(ctx.db, id, actor)),
  ];
}

export function priceIndexRoutes(ctx: AppContext): RouteDef[] {
  return [
    { method: 'get', path: '/', access: READ, cache: true, handler: async (_req, res) => res.json(await listPriceIndexes(ctx.db)) },
    createRoute(WRITE, priceIndexSchema, (body, actor) => createPriceIndex(ctx.db, body, actor)),
    // A corrected or extended index: name, base, source and every value replaced together.
    replaceRoute(WRITE, priceIndexSchema, (id, body, actor) => updatePriceIndex(ctx.db, id, body, actor)),
    deleteRoute(WRITE, (id, actor) => removePriceIndex(ctx.db, id, actor)),
  ];
}
