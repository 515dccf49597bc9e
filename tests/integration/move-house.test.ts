import { afterAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { openDatabase, type Database } from '../../server/db/client.js';
import { exportDatabase, importDatabase } from '../../server/db/portable.js';
import { loadDemoCoop } from '../../seed/load-demo.js';

// Server-only checks run in the PostgreSQL suite (npm run test:postgres).
const serverUrl = process.env.NETPUT_TEST_DB === 'postgres' ? process.env.TEST_DATABASE_URL : undefined;
const opened: Database[] = [];
const created: string[] = [];
afterAll(async () => {
  for (const d of opened) await d.close().catch(() => {});
  if (serverUrl && created.length) {
    const c = new pg.Client({ connectionString: serverUrl });
    await c.connect();
    for (const name of created) await c.query(`drop database if exists ${name} with (force)`);
    await c.end();
  }
});

async function pgDatabase(): Promise<Database> {
  const name = `netput_move_${randomBytes(4).toString('hex')}`;
  const c = new pg.Client({ connectionString: serverUrl });
  await c.connect();
  await c.query(`create database ${name}`);
  await c.end();
  created.push(name);
  const url = new URL(serverUrl!);
  url.pathname = `/${name}`;
  const d = await openDatabase({ databaseUrl: url.toString() });
  opened.push(d);
  return d;
}

describe('moving house: export and import', () => {
  it.skipIf(process.env.NETPUT_TEST_DB === 'postgres')('PGlite → PGlite keeps every row', async () => {
    const a = await openDatabase({});
    const b = await openDatabase({});
    opened.push(a, b);
    await loadDemoCoop(a.db);
    const dump = await exportDatabase(a.db);
    await importDatabase(b.db, dump);
    expect((await exportDatabase(b.db)).tables).toEqual(dump.tables);
    await expect(importDatabase(b.db, dump)).rejects.toThrow(/not empty: table/);
  }, 120_000);

  it.runIf(serverUrl)('PGlite → PostgreSQL server → PGlite finds every row equal', async () => {
    const source = await openDatabase({});
    opened.push(source);
    await loadDemoCoop(source.db);
    const dump = await exportDatabase(source.db);
    const server = await pgDatabase();
    await importDatabase(server.db, dump);
    const back = await openDatabase({});
    opened.push(back);
    await importDatabase(back.db, await exportDatabase(server.db));
    const final = await exportDatabase(back.db);
    expect(final.tables).toEqual(dump.tables);
    expect(final.tables.find((t) => t.name === 'farm_records')!.rows).toHaveLength(2800);
  }, 120_000);
});
