import { ACCESS } from '../../shared/roles.js';
import { idOf, jobRoute } from '../core/write-routes.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import {
  accountabilityQuerySchema,
  deliveriesQuerySchema,
  deliveryParamsSchema,
  expectationsBodySchema,
  methodCompareQuerySchema,
  outlookCreateSchema,
  outlookPatchSchema,
  publishSchema,
  versionParamSchema,
} from '../../shared/outlook-schemas.js';
import { compareMethods } from './expectations-service.js';
import { accountability } from './accountability.js';
import { runChoiceView } from './run-choice.js';
import { createOutlook, getOutlook, getProjection, listOutlooks, outlookSeason, patchOutlook, setExpectations, startProjection } from './outlook-drafts.js';
import { fullVersion, listVersions, publishOutlook } from './outlook-publishing.js';
import { deliveries, retryDelivery } from './outlook-deliveries.js';

/** Who reads full outlooks (every farm) and the accountability record: the planner and the board's people. */
const OUTLOOK_READ = ACCESS.outlook;
const OUTLOOK_WRITE = ACCESS.outlookWrite;
const DELIVERY_LOG = ACCESS.outlookLog;

/** `/api/outlooks`: drafts, expectations, projection, publishing, versions, delivery log, accountability. */
export function outlookRoutes(ctx: AppContext): RouteDef[] {
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
    { method: 'get', path: '/:id', access: OUTLOOK_READ, handler: async (req, res) => res.json(await getOutlook(ctx.db, idOf(req))) },
    {
      method: 'patch',
      path: '/:id',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => res.json(await patchOutlook(ctx.db, idOf(req), parse(outlookPatchSchema, req.body, 'body'), req.user!.id)),
    },
    {
      method: 'put',
      path: '/:id/expectations',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => res.json(await setExpectations(ctx.db, idOf(req), parse(expectationsBodySchema, req.body, 'body').items, req.user!.id)),
    },
    {
      // Every method's value and past errors for one item, to choose from.
      method: 'get',
      path: '/:id/expectation-methods',
      access: OUTLOOK_READ,
      handler: async (req, res) => {
        const season = await outlookSeason(ctx.db, idOf(req));
        res.json(await compareMethods(ctx.db, parse(methodCompareQuerySchema, req.query, 'query').item, season));
      },
    },
    jobRoute(ctx.jobs, OUTLOOK_WRITE, '/:id/projection', (id, actor) => startProjection(ctx.db, id, actor)),
    { method: 'get', path: '/:id/projection', access: OUTLOOK_READ, handler: async (req, res) => res.json(await getProjection(ctx.db, idOf(req))) },
    {
      method: 'post',
      path: '/:id/publish',
      access: OUTLOOK_WRITE,
      handler: async (req, res) => {
        const body = parse(publishSchema, req.body, 'body');
        res.status(201).json(await publishOutlook(ctx.db, ctx.config, idOf(req), body, { id: req.user!.id, name: req.user!.name }));
      },
    },
    { method: 'get', path: '/:id/versions', access: OUTLOOK_READ, handler: async (req, res) => res.json(await listVersions(ctx.db, idOf(req))) },
    {
      method: 'get',
      path: '/:id/deliveries',
      access: DELIVERY_LOG,
      handler: async (req, res) => res.json(await deliveries(ctx.db, idOf(req), parse(deliveriesQuerySchema, req.query, 'query').version)),
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
