import { sql } from 'drizzle-orm';
import { check, customType, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users.js';

/** Raw bytes: node-postgres hands back a Buffer, PGlite a Uint8Array; both become a Buffer here. */
const bytea = customType<{ data: Buffer; driverData: Uint8Array }>({
  dataType: () => 'bytea',
  fromDriver: (value) => Buffer.from(value),
});

/**
 * Uploaded files staged for import: the file as uploaded (gzip-compressed), the column mapping last validated, and the
 * outcome (preview, errors, counts) as JSON. A commit re-reads `content`, so nothing depends on memory.
 */
export const imports = pgTable(
  'imports',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    kind: text('kind', { enum: ['prices', 'records', 'observations', 'contracts'] }).notNull(),
    fileName: text('file_name').notNull(),
    fileSize: integer('file_size').notNull(),
    format: text('format', { enum: ['csv', 'xlsx'] }).notNull(),
    /** The uploaded file, gzip-compressed. */
    content: bytea('content').notNull(),
    /** `{ targetField: sourceColumn }` as last validated. */
    mapping: jsonb('mapping').$type<Record<string, string>>().notNull(),
    /** Delivery point for prices that name none (observation files, price files without the column). */
    deliveryPoint: text('delivery_point'),
    status: text('status', { enum: ['validated', 'committing', 'committed', 'failed'] }).notNull(),
    /** The last validation or commit outcome (shape: ImportResult in server/imports/import-types.ts). */
    result: jsonb('result').notNull(),
    createdBy: integer('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    committedAt: timestamp('committed_at', { withTimezone: true }),
  },
  (t) => [
    index('imports_created_idx').on(t.createdAt),
    check('imports_kind_check', sql`${t.kind} in ('prices','records','observations','contracts')`),
    check('imports_status_check', sql`${t.status} in ('validated','committing','committed','failed')`),
  ],
);
