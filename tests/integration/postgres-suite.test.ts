/**
 * The PostgreSQL suite (npm run test:postgres) runs every test file that opens a test database, and
 * in CI it cannot pass without having run.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { databaseTestFiles } from '../postgres-suite.js';

const ROOT = path.resolve(import.meta.dirname, '..', '..');

describe('the PostgreSQL suite', () => {
  it('takes in the server tests written for both databases, not only tests/api and tests/integration', () => {
    const files = databaseTestFiles();
    expect(files).toEqual(expect.arrayContaining(['server/mail/outbox.test.ts', 'server/imports/imports-repository.test.ts', 'tests/api/auth.test.ts', 'tests/integration/two-instances.test.ts']));
    // Pure computation needs no database and is not run twice.
    expect(files).not.toContain('server/estimation/sur.test.ts');
    expect(files.some((f) => f.startsWith('tests/browser/'))).toBe(false);
  });

  it('fails in CI when no PostgreSQL server is named, and says it did not run elsewhere', () => {
    const run = (ci: string) =>
      spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), ['tests/postgres-suite.ts'], { cwd: ROOT, env: { ...process.env, CI: ci, TEST_DATABASE_URL: '' }, encoding: 'utf8' });
    const inCi = run('true');
    expect(inCi.status).toBe(1);
    expect(inCi.stderr).toMatch(/^PostgreSQL suite FAILED: it could not run \(TEST_DATABASE_URL is not set\)/);
    const local = run('');
    expect(local.status).toBe(0);
    expect(local.stdout).toMatch(/^PostgreSQL suite NOT run: TEST_DATABASE_URL is not set/);
  }, 60_000);
});
