import { ACCESS } from '../../shared/roles.js';
import type { z } from 'zod';
import { deliveryPointSchema, farmSchema, itemSchema, seasonSchema } from '../../shared/data-schemas.js';
import type { Access, RouteDef } from '../core/routes.js';
import { createRoute, deleteRoute, replaceRoute } from '../core/write-routes.js';
import type { AppContext } from '../context.js';
import { listReference } from './reference-repository.js';
import { createReference, removeReference, replaceReference, type ReferenceInput, type ReferenceKind } from './reference-service.js';

const READ = ACCESS.reference;
const WRITE = ACCESS.dataEdit;

/** Create, replace and delete one row of `kind`. */
function writeRoutes<K extends ReferenceKind>(ctx: AppContext, kind: K, schema: z.ZodType<ReferenceInput[K]>): RouteDef[] {
  return [
    createRoute(WRITE, schema, (body, actor) => createReference(ctx.db, kind, body, actor)),
    replaceRoute(WRITE, schema, (id, body, actor) => replaceReference(ctx.db, kind, id, body, actor)),
    deleteRoute(WRITE, (id, actor) => removeReference(ctx.db, kind, id, actor)),
  ];
}

/** The list of `kind` (readable by `read`) and its writes. */
function referenceRoutes<K extends ReferenceKind>(ctx: AppContext, kind: K, schema: z.ZodType<ReferenceInput[K]>, read: Access): RouteDef[] {
  return [{ method: 'get', path: '/', access: read, cache: true, handler: async (_req, res) => res.json(await listReference(ctx.db, kind)) }, ...writeRoutes(ctx, kind, schema)];
}

/** Members read item names and units, and seasons, for their own records. */
export const itemsRoutes = (ctx: AppContext): RouteDef[] => referenceRoutes(ctx, 'item', itemSchema, 'signed-in');
export const seasonsRoutes = (ctx: AppContext): RouteDef[] => referenceRoutes(ctx, 'season', seasonSchema, 'signed-in');
export const deliveryPointsRoutes = (ctx: AppContext): RouteDef[] => referenceRoutes(ctx, 'delivery-point', deliveryPointSchema, READ);

/** Farm writes (the list with owners, narrowed for a member, is GET /api/farms in farms/farms-router.ts). */
export const farmWriteRoutes = (ctx: AppContext): RouteDef[] => writeRoutes(ctx, 'farm', farmSchema);
