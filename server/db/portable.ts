import { getTableName, is, sql } from 'drizzle-orm';
import { getTableConfig, PgTable } from 'drizzle-orm/pg-core';
import * as schema from './schema/index.js';
import type { Db } from './client.js';

/** The whole database as one JSON document, readable by either backend. */
export interface PortableDump {
  format: 'netput-database';
  version: 1;
  exportedAt: string;
  /** Rows per table, in an order where every referenced row comes first. */
  tables: { name: string; rows: Record<string, unknown>[] }[];
}

function allTables(): PgTable[] {
  return (Object.values(schema) as unknown[]).filter((v): v is PgTable => is(v, PgTable));
}

/** Tables sorted so that each comes after the tables its foreign keys point to. */
export function tablesInDependencyOrder(): PgTable[] {
  const tables = allTables();
  const byName = new Map(tables.map((t) => [getTableName(t), t]));
  const deps = new Map(
    tables.map((t) => [
      getTableName(t),
      getTableConfig(t)
        .foreignKeys.map((fk) => getTableName(fk.reference().foreignTable))
        .filter((n) => n !== getTableName(t)),
    ]),
  );
  const out: PgTable[] = [];
  const seen = new Set<string>();
  const visit = (name: string) => {
    if (seen.has(name)) return;
    seen.add(name);
    for (const d of deps.get(name) ?? []) visit(d);
    out.push(byName.get(name)!);
  };
  [...byName.keys()].sort().forEach(visit);
  return out;
}

function rowsOf(result: unknown): Record<string, unknown>[] {
  return (result as { rows: Record<string, unknown>[] }).rows;
}

export async function exportDatabase(db: Db): Promise<PortableDump> {
  const tables: PortableDump['tables'] = [];
  for (const t of tablesInDependencyOrder()) {
    const name = getTableName(t);
    const result = await db.execute(sql`select coalesce(json_agg(x), '[]'::json) as rows from (select * from ${sql.identifier(name)} order by 1) x`);
    const value = rowsOf(result)[0].rows;
    tables.push({ name, rows: (typeof value === 'string' ? JSON.parse(value) : value) as Record<string, unknown>[] });
  }
  return { format: 'netput-database', version: 1, exportedAt: new Date().toISOString(), tables };
}

/** Loads a dump into an empty, migrated database in one transaction; identities continue after the highest id. */
export async function importDatabase(db: Db, dump: PortableDump): Promise<{ table: string; rows: number }[]> {
  if (dump.format !== 'netput-database' || dump.version !== 1) throw new Error('This file is not a Netput database export (format netput-database, version 1)');
  const known = new Set(tablesInDependencyOrder().map((t) => getTableName(t)));
  for (const t of dump.tables) if (!known.has(t.name)) throw new Error(`The export holds a table this version does not know: ${t.name}`);
  return db.transaction(async (tx) => {
    for (const name of known) {
      const [{ n }] = rowsOf(await tx.execute(sql`select count(*)::int as n from ${sql.identifier(name)}`)) as { n: number }[];
      if (Number(n) > 0) throw new Error(`The target database is not empty: table ${name} has ${n} rows`);
    }
    const counts: { table: string; rows: number }[] = [];
    for (const t of dump.tables) {
      if (t.rows.length) {
        // Chunks keep each statement's parameter small on both backends.
        for (let i = 0; i < t.rows.length; i += 2000) {
          const part = JSON.stringify(t.rows.slice(i, i + 2000));
          await tx.execute(
            sql`insert into ${sql.identifier(t.name)} overriding system value select * from json_populate_recordset(null::${sql.identifier(t.name)}, ${part}::json)`,
          );
        }
        const hasId = rowsOf(
          await tx.execute(sql`select 1 from information_schema.columns where table_name = ${t.name} and column_name = 'id' and is_identity = 'YES'`),
        ).length;
        if (hasId) {
          await tx.execute(
            sql`select setval(pg_get_serial_sequence(${t.name}, 'id'), (select max(id) from ${sql.identifier(t.name)}))`,
          );
        }
      }
      counts.push({ table: t.name, rows: t.rows.length });
    }
    return counts;
  });
}
