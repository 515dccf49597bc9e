/**
 * `npm run db:export -- FILE` writes the whole database (embedded or server) to one portable file;
 * `npm run db:import -- FILE` loads such a file into an empty database. DATABASE_URL / DATA_DIR pick
 * the database, as for the server. Stop the server first when it uses the embedded database.
 */
import fs from 'node:fs';
import zlib from 'node:zlib';
import { loadConfig } from '../config.js';
import { openDatabase } from './client.js';
import { exportDatabase, importDatabase, type PortableDump } from './portable.js';

const [command, file] = process.argv.slice(2);
if ((command !== 'export' && command !== 'import') || !file) {
  console.error('usage: npm run db:export -- FILE.json.gz | npm run db:import -- FILE.json.gz');
  process.exit(2);
}
const config = loadConfig();
const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: `${config.dataDir}/pglite`, purpose: `db:${command}` }).catch((err: Error) => {
  // One plain line (e.g. the data folder is in use by the server), not a stack trace.
  console.error(`db:${command} failed: ${err.message}`);
  process.exit(1);
});
try {
  if (command === 'export') {
    const dump = await exportDatabase(database.db);
    const json = JSON.stringify(dump);
    fs.writeFileSync(file, file.endsWith('.gz') ? zlib.gzipSync(json) : json);
    console.log(`Exported ${dump.tables.reduce((s, t) => s + t.rows.length, 0)} rows from ${dump.tables.length} tables to ${file}`);
  } else {
    const raw = fs.readFileSync(file);
    const dump = JSON.parse((file.endsWith('.gz') ? zlib.gunzipSync(raw) : raw).toString('utf8')) as PortableDump;
    const counts = await importDatabase(database.db, dump);
    console.log(`Imported ${counts.reduce((s, c) => s + c.rows, 0)} rows into ${counts.length} tables from ${file}`);
  }
} catch (err) {
  console.error(`db:${command} failed: ${(err as Error).message}`);
  process.exitCode = 1;
} finally {
  await database.close();
}
