import { ACCESS } from '../../shared/roles.js';
import { z } from 'zod';
import { idListSchema } from '../../shared/ids.js';
import { factorKeySchema, factorValueSchema, landSchema, recordSchema } from '../../shared/data-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import { getSettings } from '../settings/settings-service.js';
import { exportFormatSchema, RECORD_COLUMNS, sendSpreadsheet } from '../exports/data-exports.js';
import { listFactorNames, listFactors, listLand, listRecords, recordExportRows } from './records-repository.js';
import { deleteFactor, deleteRecord, saveRecords, setFactor, setLand } from './records-service.js';

const listQuery = z.object({ farms: idListSchema, seasons: idListSchema });
/** `version`: see VersionedRecord (records-service.ts); a stale one is refused with 409 `stale`. */
const versionedRecordSchema = recordSchema.extend({ version: z.number().int().positive().nullable().optional() });
const blockSchema = z.object({ rows: z.array(versionedRecordSchema).min(1).max(5000, 'Send at most 5,000 rows at once') });
const keySchema = recordSchema.pick({ farmId: true, seasonId: true, itemId: true });

/** `/api/records`: reads narrow a member to their own farm in the repository, whatever filter they send. */
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
        res.json(await listFactors(ctx.db, req.user!, q.farms));
      },
    },
    {
      // The fixed factors recorded anywhere, with how many farms and seasons have a value: the model form's choices.
      method: 'get',
      path: '/factor-names',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => res.json(await listFactorNames(ctx.db, req.user!)),
    },
    {
      // Set one farm's level of one fixed factor in one season (a grid cell).
      method: 'put',
      path: '/factors',
      access: ACCESS.dataEdit,
      handler: async (req, res) => res.json(await setFactor(ctx.db, parse(factorValueSchema, req.body, 'body'), req.user!)),
    },
    {
      method: 'delete',
      path: '/factors',
      access: ACCESS.dataEdit,
      handler: async (req, res) => {
        await deleteFactor(ctx.db, parse(factorKeySchema, req.body, 'body'), req.user!);
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
        res.json(await listRecords(ctx.db, req.user!, { farmIds: q.farms, seasonIds: q.seasons }));
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
        await sendSpreadsheet(res, format, await recordExportRows(ctx.db, req.user!, only), RECORD_COLUMNS, 'farm-records', { decimalMark: (await getSettings(ctx.db)).decimalMark });
      },
    },
    {
      method: 'get',
      path: '/land',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => {
        const q = parse(listQuery, req.query, 'query');
        res.json(await listLand(ctx.db, req.user!, q.farms));
      },
    },
    {
      // Insert or replace quantities: a cell edited in the grid or a pasted block, all or nothing.
      method: 'put',
      path: '/',
      access: ACCESS.dataEdit,
      handler: async (req, res) => res.json(await saveRecords(ctx.db, parse(blockSchema, req.body, 'body').rows, req.user!)),
    },
    {
      method: 'delete',
      path: '/',
      access: ACCESS.dataEdit,
      handler: async (req, res) => {
        await deleteRecord(ctx.db, parse(keySchema, req.body, 'body'), req.user!);
        res.status(204).end();
      },
    },
    {
      method: 'put',
      path: '/land',
      access: ACCESS.dataEdit,
      handler: async (req, res) => res.json(await setLand(ctx.db, parse(landSchema, req.body, 'body'), req.user!)),
    },
  ];
}
