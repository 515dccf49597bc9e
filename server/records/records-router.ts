import { ACCESS } from '../../shared/roles.js';
import { z } from 'zod';
import { idListSchema } from '../../shared/ids.js';
import { factorKeySchema, factorValueSchema, landSchema, recordSchema } from '../../shared/data-schemas.js';
import type { RouteDef } from '../core/routes.js';
import { parse } from '../core/validate.js';
import type { AppContext } from '../context.js';
import type { SessionUser } from '../auth/session.js';
import { getSettings } from '../settings/settings-service.js';
import { exportFormatSchema, RECORD_COLUMNS, sendSpreadsheet } from '../exports/data-exports.js';
import { listFactorNames, listFactors, listLand, listRecords, recordExportRows } from './records-repository.js';
import { deleteFactor, deleteRecord, saveRecords, setFactor, setLand } from './records-service.js';

const listQuery = z.object({ farms: idListSchema, seasons: idListSchema });
/** `version`: see VersionedRecord (records-service.ts); a stale one is refused with 409 `stale`. */
const versionedRecordSchema = recordSchema.extend({ version: z.number().int().positive().nullable().optional() });
const blockSchema = z.object({ rows: z.array(versionedRecordSchema).min(1).max(5000, 'Send at most 5,000 rows at once') });
const keySchema = recordSchema.pick({ farmId: true, seasonId: true, itemId: true });

/** A farm-scoped read (`?farms=` narrows it; a member gets only their own farm whatever they send). */
function farmListRoute(path: string, list: (reader: SessionUser, farmIds: number[] | undefined) => Promise<unknown>): RouteDef {
  return {
    method: 'get',
    path,
    access: 'signed-in',
    cache: true,
    handler: async (req, res) => res.json(await list(req.user!, parse(listQuery, req.query, 'query').farms)),
  };
}

/**
 * An editor's write of what the body names (farm, season and item or factor), not an id in the path:
 * PUT answers what the service returns, DELETE answers 204. The service checks, writes and audits.
 */
function keyedWriteRoute<S extends z.ZodType>(method: 'put' | 'delete', path: string, schema: S, write: (body: z.output<S>, actor: SessionUser) => Promise<unknown>): RouteDef {
  return {
    method,
    path,
    access: ACCESS.dataEdit,
    handler: async (req, res) => {
      const result = await write(parse(schema, req.body, 'body'), req.user!);
      if (method === 'delete') res.status(204).end();
      else res.json(result);
    },
  };
}

/** `/api/records`: reads narrow a member to their own farm in the repository, whatever filter they send. */
export function recordsRoutes(ctx: AppContext): RouteDef[] {
  return [
    // Every fixed factor (land_ha and any other) per farm and season.
    farmListRoute('/factors', (reader, farmIds) => listFactors(ctx.db, reader, farmIds)),
    {
      // The fixed factors recorded anywhere, with how many farms and seasons have a value: the model form's choices.
      method: 'get',
      path: '/factor-names',
      access: 'signed-in',
      cache: true,
      handler: async (req, res) => res.json(await listFactorNames(ctx.db, req.user!)),
    },
    // Set one farm's level of one fixed factor in one season (a grid cell).
    keyedWriteRoute('put', '/factors', factorValueSchema, (value, actor) => setFactor(ctx.db, value, actor)),
    keyedWriteRoute('delete', '/factors', factorKeySchema, (key, actor) => deleteFactor(ctx.db, key, actor)),
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
    farmListRoute('/land', (reader, farmIds) => listLand(ctx.db, reader, farmIds)),
    // Insert or replace quantities: a cell edited in the grid or a pasted block, all or nothing.
    keyedWriteRoute('put', '/', blockSchema, (block, actor) => saveRecords(ctx.db, block.rows, actor)),
    keyedWriteRoute('delete', '/', keySchema, (key, actor) => deleteRecord(ctx.db, key, actor)),
    keyedWriteRoute('put', '/land', landSchema, (land, actor) => setLand(ctx.db, land, actor)),
  ];
}
