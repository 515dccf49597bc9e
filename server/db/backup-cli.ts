/**
 * `npm run backup -- [FILE]` and `npm run restore -- FILE`. With the embedded database a backup
 * works while the server runs (the server takes it and sends it over its local backup socket);
 * a restore needs the server stopped and says so, naming the process, when it is not.
 */
import path from 'node:path';
import { loadConfig } from '../config.js';
import { backupPglite, backupPostgres, restorePglite, restorePostgres } from './backup.js';

const [command, fileArg] = process.argv.slice(2);
const config = loadConfig();
const stamp = new Date().toISOString().slice(0, 19).replace(/[:T]/g, '-');
const file = fileArg ?? path.join(config.dataDir, `backup-${stamp}${config.databaseUrl ? '.pgdump' : '.tar.gz'}`);
const dataDir = `${config.dataDir}/pglite`;
try {
  if (command === 'backup') {
    let how = 'offline';
    if (config.databaseUrl) backupPostgres(config.databaseUrl, file);
    else how = await backupPglite(dataDir, file);
    console.log(`Backup written to ${file}${how === 'offline' ? '' : ` (${how})`}`);
  } else if (command === 'restore') {
    if (!fileArg) throw new Error('Name the backup file: npm run restore -- FILE');
    if (config.databaseUrl) restorePostgres(file, config.databaseUrl);
    else {
      const kept = await restorePglite(file, dataDir);
      if (kept) console.log(`The previous database folder was kept at ${kept}`);
    }
    console.log(`Restored from ${file}`);
  } else {
    throw new Error('usage: npm run backup -- [FILE] | npm run restore -- FILE');
  }
} catch (err) {
  console.error((err as Error).message);
  process.exitCode = 1;
}
