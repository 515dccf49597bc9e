import { afterAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { openDatabase } from '../../server/db/client.js';
import { exportDatabase } from '../../server/db/portable.js';
import { backupPglite, backupPostgres, restorePglite, restorePostgres } from '../../server/db/backup.js';
import { loadDemoCoop } from '../../seed/load-demo.js';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-backup-'));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('backup and restore', () => {
  it.skipIf(process.env.NETPUT_TEST_DB === 'postgres')('an embedded database round-trips through npm run backup / restore', async () => {
    const dir = path.join(tmp, 'a', 'pglite');
    const source = await openDatabase({ dataDir: dir });
    await loadDemoCoop(source.db);
    const before = await exportDatabase(source.db);
    await source.close();
    const file = path.join(tmp, 'a.tar.gz');
    await backupPglite(dir, file);
    const target = path.join(tmp, 'b', 'pglite');
    expect(await restorePglite(file, target)).toBeNull();
    const restored = await openDatabase({ dataDir: target });
    expect((await exportDatabase(restored.db)).tables).toEqual(before.tables);
    await restored.close();
    // Restoring over an existing folder keeps the old one beside it.
    const kept = await restorePglite(file, target);
    expect(kept && fs.existsSync(kept)).toBe(true);
  }, 120_000);

  it.runIf(process.env.NETPUT_TEST_DB === 'postgres' && process.env.TEST_DATABASE_URL)('a PostgreSQL database round-trips through pg_dump / pg_restore', async () => {
    const server = process.env.TEST_DATABASE_URL!;
    const name = `netput_backup_${randomBytes(4).toString('hex')}`;
    const admin = new pg.Client({ connectionString: server });
    await admin.connect();
    await admin.query(`create database ${name}`);
    const url = new URL(server);
    url.pathname = `/${name}`;
    try {
      const db = await openDatabase({ databaseUrl: url.toString() });
      await loadDemoCoop(db.db);
      const before = await exportDatabase(db.db);
      const file = path.join(tmp, 'pg.dump');
      backupPostgres(url.toString(), file);
      await db.db.execute('delete from farm_records');
      restorePostgres(file, url.toString());
      expect((await exportDatabase(db.db)).tables).toEqual(before.tables);
      await db.close();
    } finally {
      await admin.query(`drop database if exists ${name} with (force)`);
      await admin.end();
    }
  }, 120_000);
});
