/**
 * Runs every test file that opens a test database a second time, on a PostgreSQL server named by
 * TEST_DATABASE_URL (each test file creates its own database there and drops it). The files are
 * found by what they use (the test-database helper, the test app, or the NETPUT_TEST_DB switch), so
 * a new one is included without a list to keep.
 *
 * Without a server it says plainly that the suite did not run; in CI (CI=true) that is a failure,
 * so the suite cannot pass unrun there.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';

const ROOT = path.resolve(import.meta.dirname, '..');
const inCi = process.env.CI === 'true' || process.env.CI === '1';
const url = process.env.TEST_DATABASE_URL;

function notRun(why: string): never {
  if (inCi) {
    console.error(`PostgreSQL suite FAILED: it could not run (${why}). In CI a PostgreSQL server is required (.ci/run starts one).`);
    process.exit(1);
  }
  console.log(`PostgreSQL suite NOT run: ${why} (e.g. TEST_DATABASE_URL=postgres://postgres@127.0.0.1:5432/test).`);
  process.exit(0);
}

/** Test files that open a test database: they run on PGlite in `npm run test:server` and on the server here. */
export function databaseTestFiles(root = ROOT): string[] {
  const uses = /openTestDatabase|startTestApp|NETPUT_TEST_DB|TEST_DATABASE_URL/;
  const found: string[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(path.join(root, dir), { withFileTypes: true })) {
      const rel = path.join(dir, e.name);
      if (e.isDirectory()) {
        if (e.name !== 'node_modules' && e.name !== 'browser' && e.name !== 'fixtures') walk(rel);
      } else if (e.name.endsWith('.test.ts') && uses.test(fs.readFileSync(path.join(root, rel), 'utf8'))) {
        found.push(rel);
      }
    }
  };
  for (const dir of ['server', 'shared', 'seed', 'tests']) if (fs.existsSync(path.join(root, dir))) walk(dir);
  return found.sort();
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  if (!url) notRun('TEST_DATABASE_URL is not set');
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 5000 });
  try {
    await client.connect();
    const { rows } = await client.query<{ version: string }>('select version()');
    console.log(`PostgreSQL suite on ${rows[0]!.version.split(' on ')[0]}`);
  } catch (err) {
    console.error(`PostgreSQL suite cannot run: ${url} does not answer (${(err as Error).message})`);
    process.exit(1);
  } finally {
    await client.end().catch(() => {});
  }
  const files = databaseTestFiles();
  console.log(`${files.length} test files open a test database: ${files.join(', ')}`);
  const result = spawnSync('npx', ['vitest', 'run', '--config', 'vitest.server.config.ts', ...files], {
    cwd: ROOT,
    stdio: 'inherit',
    env: { ...process.env, NETPUT_TEST_DB: 'postgres' },
  });
  process.exit(result.status ?? 1);
}
