import { ACCESS } from '../../shared/roles.js';
import { DateTime } from 'luxon';
import { deliveryPointSchema, farmSchema, itemSchema, seasonSchema } from '../../shared/data-schemas.js';
import { crudRoutes } from '../core/crud.js';
import type { RouteDef } from '../core/routes.js';
import type { AppContext } from '../context.js';
import { deliveryPoints, farms, items, seasons } from '../db/schema/index.js';

const READ = ACCESS.reference;
const WRITE = ACCESS.dataEdit;

export const itemsRoutes = (ctx: AppContext): RouteDef[] =>
  crudRoutes(ctx, {
    entity: 'item',
    label: 'item',
    table: items,
    orderBy: items.id,
    createSchema: itemSchema,
    toValues: (v) => ({ ...v, nPct: v.nPct ?? null, p2o5Pct: v.p2o5Pct ?? null, k2oPct: v.k2oPct ?? null }),
    // Members read item names and units for their own records.
    read: 'signed-in',
    write: WRITE,
  });

export const seasonsRoutes = (ctx: AppContext): RouteDef[] =>
  crudRoutes(ctx, {
    entity: 'season',
    label: 'season',
    table: seasons,
    orderBy: seasons.startYear,
    createSchema: seasonSchema,
    toValues: (v) => ({ ...v, startsOn: DateTime.utc(v.startYear as number, v.startMonth as number, 1).toISODate() }),
    read: 'signed-in',
    write: WRITE,
  });

export const deliveryPointsRoutes = (ctx: AppContext): RouteDef[] =>
  crudRoutes(ctx, { entity: 'delivery-point', label: 'delivery point', table: deliveryPoints, orderBy: deliveryPoints.name, createSchema: deliveryPointSchema, read: READ, write: WRITE });

/** Farm writes (the list with owners is GET /api/farms). */
export const farmWriteRoutes = (ctx: AppContext): RouteDef[] =>
  crudRoutes(ctx, { entity: 'farm', label: 'farm', table: farms, orderBy: farms.code, createSchema: farmSchema, read: READ, write: WRITE }).filter(
    (r) => r.method !== 'get',
  );
