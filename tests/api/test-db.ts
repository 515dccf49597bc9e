import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { openDatabase, type Database } from '../../server/db/client.js';

/**
 * The database a test file runs on: a fresh in-memory PGlite, or — when NETPUT_TEST_DB=postgres and
 * TEST_DATABASE_URL points at a PostgreSQL server — a database of its own created on that server and
 * dropped when the file is done.
 */
export async function openTestDatabase(): Promise<Database> {
  const serverUrl = process.env.TEST_DATABASE_URL;
  if (process.env.NETPUT_TEST_DB !== 'postgres') return openDatabase({ dataDir: 'memory://' });
  if (!serverUrl) throw new Error('NETPUT_TEST_DB=postgres needs TEST_DATABASE_URL');
  const name = `netput_test_${Date.now().toString(36)}_${randomBytes(4).toString('hex')}`;
  const admin = new pg.Client({ connectionString: serverUrl });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  const url = new URL(serverUrl);
  url.pathname = `/${name}`;
  const database = await openDatabase({ databaseUrl: url.toString() });
  return {
    ...database,
    async close() {
      await database.close();
      const drop = new pg.Client({ connectionString: serverUrl });
      await drop.connect();
      await drop.query(`drop database if exists ${name} with (force)`);
      await drop.end();
    },
  };
}
