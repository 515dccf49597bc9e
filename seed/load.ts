/**
 * `npm run seed` loads the demo co-op into an empty database; `npm run seed -- --reset` wipes the
 * database and reloads it. Stop the server first: PGlite allows one process per data folder.
 */
import { loadConfig } from '../server/config.js';
import { openDatabase } from '../server/db/client.js';
import { clearDatabase, loadDemoCoop, isDatabaseEmpty } from './load-demo.js';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo-coop.js';

const config = loadConfig();
const reset = process.argv.includes('--reset');
const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: `${config.dataDir}/pglite`, purpose: 'seed' }).catch((err: Error) => {
  // One plain line (e.g. the data folder is in use by the server), not a stack trace.
  console.error(`Could not load the demo co-op: ${err.message}`);
  process.exit(1);
});
try {
  if (reset) await clearDatabase(database.db);
  if (!(await isDatabaseEmpty(database.db))) {
    console.log('The database already holds data; run `npm run seed -- --reset` to replace it with the demo co-op.');
  } else {
    await loadDemoCoop(database.db, { prepare: true });
    console.log(`Demo co-op loaded; the server fits its model and publishes its outlook in the background at the next start. Accounts (password ${DEMO_PASSWORD}): ${DEMO_ACCOUNTS.map((a) => a.email).join(', ')}`);
  }
} catch (err) {
  console.error(`Could not load the demo co-op: ${(err as Error).message}`);
  process.exitCode = 1;
} finally {
  await database.close();
}
