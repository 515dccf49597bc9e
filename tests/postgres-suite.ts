/**
 * Runs the API and repository suites a second time on a PostgreSQL server, when TEST_DATABASE_URL
 * names one (each test file creates its own database there and drops it). Without it, says plainly
 * that the server suite was not run.
 */
import { spawnSync } from 'node:child_process';
import pg from 'pg';

const url = process.env.TEST_DATABASE_URL;
if (!url) {
  console.log('PostgreSQL suite NOT run: TEST_DATABASE_URL is not set (e.g. postgres://postgres@127.0.0.1:5432/test).');
  process.exit(0);
}
const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 5000 });
try {
  await client.connect();
  const { rows } = await client.query<{ version: string }>('select version()');
  console.log(`PostgreSQL suite on ${rows[0].version.split(' on ')[0]}`);
} catch (err) {
  console.error(`PostgreSQL suite cannot run: ${url} does not answer (${(err as Error).message})`);
  process.exit(1);
} finally {
  await client.end().catch(() => {});
}
const result = spawnSync('npx', ['vitest', 'run', '--config', 'vitest.server.config.ts', 'tests/api', 'tests/integration'], {
  stdio: 'inherit',
  env: { ...process.env, NETPUT_TEST_DB: 'postgres' },
});
process.exit(result.status ?? 1);
