import { asc, eq, getTableColumns, type AnyColumn } from 'drizzle-orm';
import type { PgTable } from 'drizzle-orm/pg-core';
import type { z } from 'zod';
import { idParamSchema } from '../../shared/schemas.js';
import type { AppContext } from '../context.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { Access, RouteDef } from './routes.js';
import { parse } from './validate.js';
import { AppError } from './app-error.js';

export interface CrudSpec {
  /** e.g. `item`: names the audit entity and the messages. */
  entity: string;
  label: string;
  table: PgTable & { id: AnyColumn };
  orderBy: AnyColumn;
  createSchema: z.ZodType<Record<string, unknown>>;
  /** Turns validated input into column values (defaults to the input itself). */
  toValues?: (input: Record<string, unknown>) => Record<string, unknown>;
  read: Access;
  write: Access;
}

/**
 * List, create, replace and delete for a plain reference table, each write audited in its
 * transaction. Deleting a row still in use answers 409 (the foreign key refuses it).
 */
export function crudRoutes(ctx: AppContext, spec: CrudSpec): RouteDef[] {
  // Drizzle's generic table types do not survive this level of abstraction; the casts stay here.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const table = spec.table as any;
  const toValues = spec.toValues ?? ((v) => v);
  const columns = getTableColumns(spec.table);
  const findById = async (db: AppContext['db'], id: number) => {
    const [row] = await db.select(columns).from(table).where(eq(spec.table.id, id));
    if (!row) throw AppError.notFound(`The ${spec.label}`);
    return row as Record<string, unknown>;
  };
  return [
    {
      method: 'get',
      path: '/',
      access: spec.read,
      cache: true,
      handler: async (_req, res) => res.json(await ctx.db.select(columns).from(table).orderBy(asc(spec.orderBy))),
    },
    {
      method: 'post',
      path: '/',
      access: spec.write,
      handler: async (req, res) => {
        const input = parse(spec.createSchema, req.body, 'body');
        const row = await ctx.db.transaction(async (tx) => {
          const [created] = (await tx.insert(table).values(toValues(input)).returning()) as { id: number }[];
          await recordAudit(tx, { actorUserId: req.user!.id, action: `${spec.entity}.create`, entity: spec.entity, entityId: created.id, after: created });
          return created;
        });
        res.status(201).json(row);
      },
    },
    {
      method: 'put',
      path: '/:id',
      access: spec.write,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        const input = parse(spec.createSchema, req.body, 'body');
        const row = await ctx.db.transaction(async (tx) => {
          const before = await findById(tx, id);
          const [after] = (await tx.update(table).set(toValues(input)).where(eq(spec.table.id, id)).returning()) as unknown[];
          await recordAudit(tx, { actorUserId: req.user!.id, action: `${spec.entity}.update`, entity: spec.entity, entityId: id, before, after });
          return after;
        });
        res.json(row);
      },
    },
    {
      method: 'delete',
      path: '/:id',
      access: spec.write,
      handler: async (req, res) => {
        const { id } = parse(idParamSchema, req.params, 'params');
        await ctx.db.transaction(async (tx) => {
          const before = await findById(tx, id);
          await tx.delete(table).where(eq(spec.table.id, id));
          await recordAudit(tx, { actorUserId: req.user!.id, action: `${spec.entity}.delete`, entity: spec.entity, entityId: id, before });
        });
        res.status(204).end();
      },
    },
  ];
}
