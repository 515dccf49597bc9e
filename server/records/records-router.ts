import { and, asc, countDistinct, eq, inArray, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import { idListSchema } from '../../shared/ids.js';
import type { FarmRecordRow } from '../../shared/api-types.js';
import { factorKeySchema, factorValueSchema, landSchema, recordSchema } from '../../shared/data-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import { AppError } from '../core/app-error.js';
import type { AppContext } from '../context.js';
import type { Db } from '../db/client.js';
import { farmRecords, farms, farmSeasonFactors, items, seasons } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { SessionUser } from '../auth/session.js';
import { exportFormatSchema, RECORD_COLUMNS, recordExportRows, sendSpreadsheet } from '../exports/data-exports.js';

const listQuery = z.object({ farms: idListSchema, seasons: idListSchema });
/**
 * `version`: the version of the stored quantity the edit started from (GET /api/records), or null
 * when the cell was empty; a save whose version is no longer the stored one is refused (409 `stale`).
 * Left out, the row is written whatever is stored (pasted blocks of new seasons).
 */
const versionedRecordSchema = recordSchema.extend({ version: z.number().int().positive().nullable().optional() });
const blockSchema = z.object({ rows: z.array(versionedRecordSchema).min(1).max(5000, 'Send at most 5,000 rows at once') });
const keySchema = recordSchema.pick({ farmId: true, seasonId: true, itemId: true });

/** Members are held to their own farm whatever filter they send. */
function farmScope(user: SessionUser, requested?: number[]): number[] | undefined {
  if (user.role !== 'member') return requested;
  if (user.farmId === null) return [];
  return [user.farmId];
}

export async function listRecords(db: Db, farmIds?: number[], seasonIds?: number[]): Promise<FarmRecordRow[]> {
  if (farmIds && farmIds.length === 0) return [];
  const parts: SQL[] = [];
  if (farmIds) parts.push(inArray(farmRecords.farmId, farmIds));
  if (seasonIds?.length) parts.push(inArray(farmRecords.seasonId, seasonIds));
  return db
    .select({
      farmId: farmRecords.farmId,
      farmCode: farms.code,
      seasonId: farmRecords.seasonId,
      season: seasons.label,
      itemId: farmRecords.itemId,
      itemCode: items.code,
      itemName: items.name,
      role: items.role,
      unit: items.unit,
      quantity: farmRecords.quantity,
      version: farmRecords.version,
    })
    .from(farmRecords)
    .innerJoin(farms, eq(farms.id, farmRecords.farmId))
    .innerJoin(seasons, eq(seasons.id, farmRecords.seasonId))
    .innerJoin(items, eq(items.id, farmRecords.itemId))
    .where(parts.length ? and(...parts) : undefined)
    .orderBy(asc(farms.code), asc(seasons.startYear), asc(items.id));
}

export async function listLand(db: Db, farmIds?: number[]) {
  if (farmIds && farmIds.length === 0) return [];
  return db
    .select({ farmId: farmSeasonFactors.farmId, farmCode: farms.code, seasonId: farmSeasonFactors.seasonId, season: seasons.label, landHa: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .innerJoin(farms, eq(farms.id, farmSeasonFactors.farmId))
    .innerJoin(seasons, eq(seasons.id, farmSeasonFactors.seasonId))
    .where(and(eq(farmSeasonFactors.factor, 'land_ha'), farmIds ? inArray(farmSeasonFactors.farmId, farmIds) : undefined))
    .orderBy(asc(farms.code), asc(seasons.startYear));
}

export async function listFactors(db: Db, farmIds?: number[]) {
  if (farmIds && farmIds.length === 0) return [];
  return db
    .select({ farmId: farmSeasonFactors.farmId, farmCode: farms.code, seasonId: farmSeasonFactors.seasonId, season: seasons.label, factor: farmSeasonFactors.factor, value: farmSeasonFactors.value })
    .from(farmSeasonFactors)
    .innerJoin(farms, eq(farms.id, farmSeasonFactors.farmId))
    .innerJoin(seasons, eq(seasons.id, farmSeasonFactors.seasonId))
    .where(farmIds ? inArray(farmSeasonFactors.farmId, farmIds) : undefined)
    .orderBy(asc(farms.code), asc(seasons.startYear), asc(farmSeasonFactors.factor));
}

export function recordsRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      // Every fixed factor (land_ha and any other) per farm and season.
      method: 'get',
      path: '/factors',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listFactors(ctx.db, farmScope(req.user!, q.farms)));
      },
    },
    {
      // The fixed factors recorded anywhere, with how many farms and seasons have a value: the model form's choices.
      method: 'get',
      path: '/factor-names',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => {
        const scope = farmScope(req.user!, undefined);
        if (scope && scope.length === 0) return res.json([]);
        res.json(
          await ctx.db
            .select({ factor: farmSeasonFactors.factor, farms: countDistinct(farmSeasonFactors.farmId), seasons: countDistinct(farmSeasonFactors.seasonId) })
            .from(farmSeasonFactors)
            .where(scope ? inArray(farmSeasonFactors.farmId, scope) : undefined)
            .groupBy(farmSeasonFactors.factor)
            .orderBy(asc(farmSeasonFactors.factor)),
        );
      },
    },
    {
      // Set one farm's level of one fixed factor in one season (a grid cell).
      method: 'put',
      path: '/factors',
      access: ['planner'],
      handler: async (req, res) => {
        const body = parse(factorValueSchema, req.body, 'body');
        if (body.factor === 'land_ha' && !(body.value > 0)) throw AppError.invalid('Land must be more than 0 ha', [{ path: 'body.value', message: 'Land must be more than 0 ha' }]);
        await ctx.db.transaction(async (tx) => {
          const key = and(eq(farmSeasonFactors.farmId, body.farmId), eq(farmSeasonFactors.seasonId, body.seasonId), eq(farmSeasonFactors.factor, body.factor));
          const [before] = await tx.select().from(farmSeasonFactors).where(key);
          await tx
            .insert(farmSeasonFactors)
            .values(body)
            .onConflictDoUpdate({ target: [farmSeasonFactors.farmId, farmSeasonFactors.seasonId, farmSeasonFactors.factor], set: { value: body.value } });
          await recordAudit(tx, { actorUserId: req.user!.id, action: before ? 'factor.update' : 'factor.create', entity: 'farm-factor', entityId: `${body.farmId}/${body.seasonId}/${body.factor}`, before: before ?? null, after: body });
        });
        res.json(await listFactors(ctx.db, [body.farmId]));
      },
    },
    {
      method: 'delete',
      path: '/factors',
      access: ['planner'],
      handler: async (req, res) => {
        const k = parse(factorKeySchema, req.body, 'body');
        await ctx.db.transaction(async (tx) => {
          const deleted = await tx
            .delete(farmSeasonFactors)
            .where(and(eq(farmSeasonFactors.farmId, k.farmId), eq(farmSeasonFactors.seasonId, k.seasonId), eq(farmSeasonFactors.factor, k.factor)))
            .returning();
          if (!deleted.length) throw AppError.notFound('The fixed factor value');
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'factor.delete', entity: 'farm-factor', entityId: `${k.farmId}/${k.seasonId}/${k.factor}`, before: deleted[0] });
        });
        res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listRecords(ctx.db, farmScope(req.user!, q.farms), q.seasons));
      },
    },
    {
      // Members export only their own farm's records.
      method: 'get',
      path: '/export',
      access: 'signed-in',
      handler: async (req, res) => {
        // `?farms=3` narrows a planner's export to those farms (the farm page downloads its own).
        const { format, farms: only } = parse(exportFormatSchema.extend({ farms: idListSchema }), req.query, 'query');
        await sendSpreadsheet(res, format, await recordExportRows(ctx.db, farmScope(req.user!, only)), RECORD_COLUMNS, 'farm-records');
      },
    },
    {
      method: 'get',
      path: '/land',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listLand(ctx.db, farmScope(req.user!, q.farms)));
      },
    },
    {
      // Insert or replace quantities: a cell edited in the grid or a pasted block, all or nothing.
      method: 'put',
      path: '/',
      access: ['planner'],
      handler: async (req, res) => {
        const { rows } = parse(blockSchema, req.body, 'body');
        await ctx.db.transaction(async (tx) => {
          for (const { version, ...row } of rows) {
            const key = and(eq(farmRecords.farmId, row.farmId), eq(farmRecords.seasonId, row.seasonId), eq(farmRecords.itemId, row.itemId));
            // Locked before it is read: the audit's "before" is the value this write replaces.
            const [before] = await tx.select().from(farmRecords).where(key).for('update');
            if (version !== undefined && (before?.version ?? null) !== version) {
              const [current] = before ? await listRecords(tx, [row.farmId], [row.seasonId]).then((all) => all.filter((r) => r.itemId === row.itemId)) : [null];
              const now = current ? `now ${current.quantity} ${current.unit}` : 'it has been deleted';
              throw AppError.stale(`Someone else changed this farm record meanwhile (${now}); keep yours or take theirs`, current);
            }
            await tx
              .insert(farmRecords)
              .values(row)
              .onConflictDoUpdate({ target: [farmRecords.farmId, farmRecords.seasonId, farmRecords.itemId], set: { quantity: row.quantity, version: sql`${farmRecords.version} + 1` } });
            await recordAudit(tx, {
              actorUserId: req.user!.id,
              action: before ? 'record.update' : 'record.create',
              entity: 'farm-record',
              entityId: `${row.farmId}/${row.seasonId}/${row.itemId}`,
              before: before ?? null,
              after: row,
            });
          }
        });
        res.json(await listRecords(ctx.db, [...new Set(rows.map((r) => r.farmId))], [...new Set(rows.map((r) => r.seasonId))]));
      },
    },
    {
      method: 'delete',
      path: '/',
      access: ['planner'],
      handler: async (req, res) => {
        const k = parse(keySchema, req.body, 'body');
        await ctx.db.transaction(async (tx) => {
          const deleted = await tx
            .delete(farmRecords)
            .where(and(eq(farmRecords.farmId, k.farmId), eq(farmRecords.seasonId, k.seasonId), eq(farmRecords.itemId, k.itemId)))
            .returning();
          if (!deleted.length) throw AppError.notFound('The farm record');
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'record.delete', entity: 'farm-record', entityId: `${k.farmId}/${k.seasonId}/${k.itemId}`, before: deleted[0] });
        });
        res.status(204).end();
      },
    },
    {
      method: 'put',
      path: '/land',
      access: ['planner'],
      handler: async (req, res) => {
        const body = parse(landSchema, req.body, 'body');
        await ctx.db.transaction(async (tx) => {
          const key = and(eq(farmSeasonFactors.farmId, body.farmId), eq(farmSeasonFactors.seasonId, body.seasonId), eq(farmSeasonFactors.factor, 'land_ha'));
          const [before] = await tx.select().from(farmSeasonFactors).where(key);
          await tx
            .insert(farmSeasonFactors)
            .values({ farmId: body.farmId, seasonId: body.seasonId, factor: 'land_ha', value: body.landHa })
            .onConflictDoUpdate({ target: [farmSeasonFactors.farmId, farmSeasonFactors.seasonId, farmSeasonFactors.factor], set: { value: body.landHa } });
          await recordAudit(tx, { actorUserId: req.user!.id, action: 'land.update', entity: 'farm-land', entityId: `${body.farmId}/${body.seasonId}`, before: before ?? null, after: body });
        });
        res.json(await listLand(ctx.db, [body.farmId]));
      },
    },
  ];
}
