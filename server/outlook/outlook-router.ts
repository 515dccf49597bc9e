import { ACCESS } from '../../shared/roles.js';
import { and, asc, eq, type SQL } from 'drizzle-orm';
import { idParamSchema } from '../../shared/schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import { futuresQuotes, items, seasons } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';
import {
  accountabilityQuerySchema,
  deliveriesQuerySchema,
  deliveryParamsSchema,
  expectationsBodySchema,
  futuresListQuerySchema,
  futuresQuoteSchema,
  methodCompareQuerySchema,
  outlookCreateSchema,
  outlookPatchSchema,
  publishSchema,
  versionParamSchema,
} from '../../shared/outlook-schemas.js';
import { compareMethods } from './expectations-service.js';
import { accountability } from './accountability.js';
import { runChoiceView } from './run-choice.js';
import {
  createOutlook,
  deliveries,
  fullVersion,
  getOutlook,
  getProjection,
  listOutlooks,
  listVersions,
  outlookSeason,
  patchOutlook,
  publishOutlook,
  retryDelivery,
  setExpectations,
  startProjection,
} from './outlook-service.js';

/** Who reads full outlooks (every farm) and the accountability record: the planner and the board's people. */
const OUTLOOK_READ = ACCESS.outlook;
const OUTLOOK_WRITE = ACCESS.outlookWrite;
const DELIVERY_LOG = ACCESS.outlookLog;

/** `/api/outlooks`: drafts, expectations, projection, publishing, versions, delivery log, accountability. */
export function outlookRoutes(ctx: AppContext): RouteDef[] {
  const id = (req: { params: unknown }) => parse(idParamSchema, req.params, 'params').id;
  return [
    { method: 'get', path: '/', access: OUTLOOK_READ, cache: true, handler: async (_req, res) => res.json(await listOutlooks(ctx.db)) },
    {
      method: 'post',
      path: '/',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => res.status(201).json(await createOutlook(ctx.db, parse(outlookCreateSchema, req.body, 'body'), req.user!.id)),
    },
    // Fixed paths before /:id.
    {
      method: 'get',
      path: '/accountability',
      access: OUTLOOK_READ,
      handler: async (req, res) => res.json(await accountability(ctx.db, parse(accountabilityQuerySchema, req.query, 'query').version)),
    },
    // The finished runs with their back-tests in words, and the one the back-test favours.
    { method: 'get', path: '/run-choice', access: OUTLOOK_READ, cache: true, handler: async (_req, res) => res.json(await runChoiceView(ctx.db)) },
    { method: 'get', path: '/versions', access: OUTLOOK_READ, handler: async (_req, res) => res.json(await listVersions(ctx.db)) },
    {
      method: 'get',
      path: '/versions/:versionId',
      access: OUTLOOK_READ,
      handler: async (req, res) => res.json(await fullVersion(ctx.db, parse(versionParamSchema, req.params, 'params').versionId)),
    },
    { method: 'get', path: '/:id', access: OUTLOOK_READ, handler: async (req, res) => res.json(await getOutlook(ctx.db, id(req))) },
    {
      method: 'patch',
      path: '/:id',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => res.json(await patchOutlook(ctx.db, id(req), parse(outlookPatchSchema, req.body, 'body'), req.user!.id)),
    },
    {
      method: 'put',
      path: '/:id/expectations',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => res.json(await setExpectations(ctx.db, id(req), parse(expectationsBodySchema, req.body, 'body').items, req.user!.id)),
    },
    {
      // Every method's value and past errors for one item, to choose from.
      method: 'get',
      path: '/:id/expectation-methods',
      access: OUTLOOK_READ,
      handler: async (req, res) => {
        const season = await outlookSeason(ctx.db, id(req));
        res.json(await compareMethods(ctx.db, parse(methodCompareQuerySchema, req.query, 'query').item, season));
      },
    },
    {
      method: 'post',
      path: '/:id/projection',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => {
        const started = await startProjection(ctx.db, id(req), req.user!.id);
        ctx.jobs?.poke();
        res.status(202).json(started);
      },
    },
    { method: 'get', path: '/:id/projection', access: OUTLOOK_READ, handler: async (req, res) => res.json(await getProjection(ctx.db, id(req))) },
    {
      method: 'post',
      path: '/:id/publish',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => {
        const body = parse(publishSchema, req.body, 'body');
        res.status(201).json(await publishOutlook(ctx.db, ctx.config, id(req), body, { id: req.user!.id, name: req.user!.name }));
      },
    },
    { method: 'get', path: '/:id/versions', access: OUTLOOK_READ, handler: async (req, res) => res.json(await listVersions(ctx.db, id(req))) },
    {
      method: 'get',
      path: '/:id/deliveries',
      access: DELIVERY_LOG,
      handler: async (req, res) => res.json(await deliveries(ctx.db, id(req), parse(deliveriesQuerySchema, req.query, 'query').version)),
    },
    {
      method: 'post',
      path: '/:id/deliveries/:deliveryId/retry',
      access: DELIVERY_LOG,
      handler: async (req, res) => {
        const p = parse(deliveryParamsSchema, req.params, 'params');
        await retryDelivery(ctx.db, p.id, p.deliveryId, req.user!.id);
        res.status(202).json({ status: 'queued' });
      },
    },
  ];
}

const quoteColumns = {
  id: futuresQuotes.id,
  itemId: futuresQuotes.itemId,
  itemCode: items.code,
  seasonId: futuresQuotes.seasonId,
  season: seasons.label,
  contract: futuresQuotes.contract,
  quote: futuresQuotes.quote,
  currency: futuresQuotes.currency,
  quotedOn: futuresQuotes.quotedOn,
  source: futuresQuotes.source,
};

/** `/api/futures-quotes`: the futures history for the futures-plus-basis expectation (planner edits, readers read). */
export function futuresRoutes(ctx: AppContext): RouteDef[] {
  const one = async (db: AppContext['db'], quoteId: number) => {
    const [row] = await db
      .select(quoteColumns)
      .from(futuresQuotes)
      .innerJoin(items, eq(items.id, futuresQuotes.itemId))
      .innerJoin(seasons, eq(seasons.id, futuresQuotes.seasonId))
      .where(eq(futuresQuotes.id, quoteId));
    if (!row) throw AppError.notFound('The futures quote');
    return row;
  };
  const checkRefs = async (db: AppContext['db'], body: { itemId: number; seasonId: number }) => {
    const [it] = await db.select({ id: items.id }).from(items).where(eq(items.id, body.itemId));
    if (!it) throw AppError.invalid('The item does not exist', [{ path: 'body.itemId', message: 'No item has this id' }]);
    const [s] = await db.select({ id: seasons.id }).from(seasons).where(eq(seasons.id, body.seasonId));
    if (!s) throw AppError.invalid('The season does not exist', [{ path: 'body.seasonId', message: 'No season has this id' }]);
  };
  return [
    {
      method: 'get',
      path: '/',
      access: OUTLOOK_READ,
      handler: async (req, res) => {
        const q = parse(futuresListQuerySchema, req.query, 'query');
        const parts: SQL[] = [];
        if (q.itemId) parts.push(eq(futuresQuotes.itemId, q.itemId));
        if (q.seasonId) parts.push(eq(futuresQuotes.seasonId, q.seasonId));
        res.json(
          await ctx.db
            .select(quoteColumns)
            .from(futuresQuotes)
            .innerJoin(items, eq(items.id, futuresQuotes.itemId))
            .innerJoin(seasons, eq(seasons.id, futuresQuotes.seasonId))
            .where(parts.length ? and(...parts) : undefined)
            .orderBy(asc(items.id), asc(seasons.startYear), asc(futuresQuotes.quotedOn)),
        );
      },
    },
    {
      method: 'post',
      path: '/',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => {
        const body = parse(futuresQuoteSchema, req.body, 'body');
        const row = await ctx.db.transaction(async (tx) => {
          await checkRefs(tx, body);
          const [created] = await tx.insert(futuresQuotes).values({ ...body, createdBy: req.user!.id }).returning({ id: futuresQuotes.id });
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'futures-quote.create', entity: 'futures-quote', entityId: created!.id, after: body });
          return one(tx, created!.id);
        });
        res.status(201).json(row);
      },
    },
    {
      method: 'put',
      path: '/:id',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => {
        const quoteId = parse(idParamSchema, req.params, 'params').id;
        const body = parse(futuresQuoteSchema, req.body, 'body');
        const row = await ctx.db.transaction(async (tx) => {
          const before = await one(tx, quoteId);
          await checkRefs(tx, body);
          await tx.update(futuresQuotes).set(body).where(eq(futuresQuotes.id, quoteId));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'futures-quote.update', entity: 'futures-quote', entityId: quoteId, before, after: body });
          return one(tx, quoteId);
        });
        res.json(row);
      },
    },
    {
      method: 'delete',
      path: '/:id',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => {
        const quoteId = parse(idParamSchema, req.params, 'params').id;
        await ctx.db.transaction(async (tx) => {
          const before = await one(tx, quoteId);
          await tx.delete(futuresQuotes).where(eq(futuresQuotes.id, quoteId));
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'futures-quote.delete', entity: 'futures-quote', entityId: quoteId, before });
        });
        res.status(204).end();
      },
    },
  ];
}
