/**
 * Exports of prices and farm records in exactly the column layout the imports read (server/imports),
 * so a downloaded file can be edited and uploaded again. Mounted by the prices and records routers:
 *
 *   GET /api/prices/export?format=csv|xlsx   → sendSpreadsheet(res, format, await priceExportRows(db), PRICE_COLUMNS, 'prices')
 *   GET /api/records/export?format=csv|xlsx  → ... recordExportRows(db, reader, farmIds) (records-repository.ts) ..., RECORD_COLUMNS, 'farm-records'
 */
import type { Response } from 'express';
import { asc, eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { z } from 'zod';
import type { Db } from '../db/client.js';
import { deliveryPoints, items, priceObservations, seasons } from '../db/schema/index.js';
import { PRICE_COLUMNS as SHARED_PRICE_COLUMNS } from '../../shared/price-columns.js';
import { toCsv, toXlsx, type SheetColumn, type SheetRow } from './spreadsheet-writers.js';

export const exportFormatSchema = z.object({ format: z.enum(['csv', 'xlsx'], { error: 'Choose format=csv or format=xlsx' }).default('csv') });
export type ExportFormat = z.infer<typeof exportFormatSchema>['format'];

/** The price table's columns (shared/price-columns.ts), keyed as priceExportRows names them. */
export const PRICE_COLUMNS: SheetColumn[] = SHARED_PRICE_COLUMNS.map((c) => ({
  key: c.field.replace(/_(\w)/g, (_m, ch: string) => ch.toUpperCase()),
  header: c.field,
  type: c.type,
  width: c.width,
}));

/** The records import's fields (RECORD_FIELDS): land_ha repeats on each row of a farm and season. */
export const RECORD_COLUMNS: SheetColumn[] = [
  { key: 'farm', header: 'farm', width: 8 },
  { key: 'season', header: 'season', width: 10 },
  { key: 'item', header: 'item', width: 12 },
  { key: 'quantity', header: 'quantity', type: 'number', width: 12 },
  { key: 'unit', header: 'unit', width: 10 },
  { key: 'landHa', header: 'land_ha', type: 'number', width: 10 },
];

export async function priceExportRows(db: Db): Promise<SheetRow[]> {
  return db
    .select({
      item: items.code,
      season: seasons.label,
      deliveryPoint: deliveryPoints.name,
      price: priceObservations.price,
      unit: items.unit,
      currency: priceObservations.currency,
      source: priceObservations.source,
      observedOn: priceObservations.observedOn,
    })
    .from(priceObservations)
    .innerJoin(items, eq(items.id, priceObservations.itemId))
    .innerJoin(seasons, eq(seasons.id, priceObservations.seasonId))
    .innerJoin(deliveryPoints, eq(deliveryPoints.id, priceObservations.deliveryPointId))
    .orderBy(asc(seasons.startYear), asc(items.id), asc(deliveryPoints.name), asc(priceObservations.observedOn));
}

const MEDIA_TYPE: Record<ExportFormat, string> = {
  csv: 'text/csv; charset=utf-8',
  xlsx: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
};

/** Answers the rows as a download named `netput-<baseName>-<date>.<format>`. */
export async function sendSpreadsheet(res: Response, format: ExportFormat, rows: SheetRow[], columns: SheetColumn[], baseName: string) {
  const fileName = `netput-${baseName}-${DateTime.utc().toISODate()}.${format}`;
  const body = format === 'csv' ? Buffer.from(toCsv(rows, columns), 'utf8') : await toXlsx(rows, columns, baseName);
  res.setHeader('Content-Type', MEDIA_TYPE[format]);
  res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
  res.setHeader('Cache-Control', 'no-store');
  res.send(body);
}
