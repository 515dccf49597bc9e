import { ACCESS } from '../../shared/roles.js';
import { eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { idListSchema, idSchema, idTextSchema } from '../../shared/ids.js';
import { priceIndexSchema, priceSchema } from '../../shared/data-schemas.js';
import { idParamSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import { priceIndexes, priceIndexValues, priceObservations, seasons } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getPrice, listPrices, priceSeries } from './prices-repository.js';
import { createPrices, updatePrice } from './prices-service.js';
import { CONFIRM_FLAG } from '../../shared/plausibility.js';
import { exportFormatSchema, PRICE_COLUMNS, priceExportRows, sendSpreadsheet } from '../exports/data-exports.js';

const READ = ACCESS.prices;
const WRITE = ACCESS.dataEdit;

const listQuery = z.object({ items: idListSchema, seasons: idListSchema, deliveryPoints: idListSchema });
const seriesQuery = z.object({ items: idListSchema, deflator: idTextSchema.optional() });
const confirmSchema = z.boolean({ error: 'Send confirmImplausible as true or false' }).optional();
const blockSchema = z.object({
  rows: z.array(priceSchema).min(1, 'Send at least one row').max(5000, 'Paste at most 5,000 rows at once'),
  [CONFIRM_FLAG]: confirmSchema,
});
const updateSchema = priceSchema.extend({
  version: z.number({ error: 'Send the version of the price you edited (from GET /api/prices)' }).int().positive(),
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
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listPrices(ctx.db, { itemIds: q.items, seasonIds: q.seasons, deliveryPointIds: q.deliveryPoints }));
      },
    },
    {
      // The same columns the price import reads, so an export re-imports cleanly.
      method: 'get',
      path: '/export',
      access: READ,
      handler: async (req, res) => {
        const { format } = parse(exportFormatSchema, req.query, 'query');
        await sendSpreadsheet(res, format, await priceExportRows(ctx.db), PRICE_COLUMNS, 'prices');
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
    {
      // One row or a pasted block: all rows are written or none.
      method: 'post',
      path: '/',
      access: WRITE,
      handler: async (req, res) => {
        const body = parse(blockSchema, req.body, 'body');
        res.status(201).json(await createPrices(ctx.db, body.rows, req.user!.id, body[CONFIRM_FLAG] === true));
      },
    },
    {
      method: 'put',
      path: '/:id',
      access: WRITE,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const { version, [CONFIRM_FLAG]: confirmed, ...body } = parse(updateSchema, req.body, 'body');
        res.json(await updatePrice(ctx.db, id, body, version, req.user!.id, confirmed === true));
      },
    },
    {
      // The rows chosen in the grid: all are deleted or none (an id that is gone refuses the lot).
      method: 'post',
      path: '/deletions',
      access: WRITE,
      handler: async (req, res) => {
        const { ids } = parse(deleteBlockSchema, req.body, 'body');
        await ctx.db.transaction(async (tx) => {
          const before = await listPrices(tx, { ids });
          const found = new Set(before.map((r) => r.id));
          const missing = ids.filter((id) => !found.has(id));
          if (missing.length) {
            const list = `${missing.slice(0, 10).join(', ')}${missing.length > 10 ? ', …' : ''}`;
            throw new AppError(404, 'not_found', `${missing.length === 1 ? `Price ${list} was` : `Prices ${list} were`} not found (deleted meanwhile?); nothing was deleted`);
          }
          await tx.delete(priceObservations).where(inArray(priceObservations.id, ids));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'price.delete', entity: 'price', entityId: ids.join(','), before });
        });
        res.json({ deleted: ids.length });
      },
    },
    {
      method: 'delete',
      path: '/:id',
      access: WRITE,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        await ctx.db.transaction(async (tx) => {
          const before = await getPrice(tx, id);
          await tx.delete(priceObservations).where(eq(priceObservations.id, id));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'price.delete', entity: 'price', entityId: id, before });
        });
        res.status(204).end();
      },
    },
  ];
}

export function priceIndexRoutes(ctx: AppContext): RouteDef[] {
  const load = async (db: AppContext['db'], id?: number) => {
    const ixs = await (id ? db.select().from(priceIndexes).where(eq(priceIndexes.id, id)) : db.select().from(priceIndexes));
    const values = await db
      .select({ indexId: priceIndexValues.indexId, seasonId: priceIndexValues.seasonId, season: seasons.label, value: priceIndexValues.value, year: seasons.startYear })
      .from(priceIndexValues)
      .innerJoin(seasons, eq(seasons.id, priceIndexValues.seasonId));
    return ixs.map((ix) => ({
      ...ix,
      values: values
        .filter((v) => v.indexId === ix.id)
        .sort((a, b) => a.year - b.year)
        .map(({ seasonId, season, value }) => ({ seasonId, season, value })),
    }));
  };
  return [
    { method: 'get', path: '/', access: READ, cache: true, handler: async (_req, res) => res.json(await load(ctx.db)) },
    {
      method: 'post',
      path: '/',
      access: WRITE,
      handler: async (req, res) => {
        const body = parse(priceIndexSchema, req.body, 'body');
        const id = await ctx.db.transaction(async (tx) => {
          const [ix] = await tx.insert(priceIndexes).values({ name: body.name, base: body.base, source: body.source }).returning({ id: priceIndexes.id });
          if (body.values.length) await tx.insert(priceIndexValues).values(body.values.map((v) => ({ indexId: ix.id, ...v })));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'price-index.create', entity: 'price-index', entityId: ix.id, after: body });
          return ix.id;
        });
        res.status(201).json((await load(ctx.db, id))[0]);
      },
    },
    {
      // A corrected or extended index: name, base, source and every value replaced together.
      method: 'put',
      path: '/:id',
      access: WRITE,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const body = parse(priceIndexSchema, req.body, 'body');
        await ctx.db.transaction(async (tx) => {
          const [before] = await load(tx, id);
          if (!before) throw AppError.notFound('The price index');
          await tx.update(priceIndexes).set({ name: body.name, base: body.base, source: body.source }).where(eq(priceIndexes.id, id));
          await tx.delete(priceIndexValues).where(eq(priceIndexValues.indexId, id));
          if (body.values.length) await tx.insert(priceIndexValues).values(body.values.map((v) => ({ indexId: id, ...v })));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'price-index.update', entity: 'price-index', entityId: id, before, after: (await load(tx, id))[0] });
        });
        res.json((await load(ctx.db, id))[0]);
      },
    },
    {
      method: 'delete',
      path: '/:id',
      access: WRITE,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        await ctx.db.transaction(async (tx) => {
          const [before] = await load(tx, id);
          if (!before) throw AppError.notFound('The price index');
          await tx.delete(priceIndexes).where(eq(priceIndexes.id, id));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'price-index.delete', entity: 'price-index', entityId: id, before });
        });
        res.status(204).end();
      },
    },
  ];
}
