/**
 * Import benchmark (run on demand; not a test):
 *   npx tsx bench/import-bench.ts [--rows 100000] [--db tmp|memory]
 * A generated price CSV of 100,000 rows (invented prices for the demo co-op's items, seasons and
 * delivery points, one per day) is staged and validated, then committed, through the same service
 * functions the API calls, against a PGlite database holding the demo co-op. With --db tmp (the
 * default) a child process creates the database in a fresh temp dir first, so this process opens an
 * existing database as a server does (PGlite's initdb alone peaks near 900 MB RSS); --db memory
 * does everything in memory in this process. Measures the wall time of validation (upload to preview, with the worker thread already
 * started; the start itself is reported apart) and of the commit (202 to `committed`), and the peak
 * resident set size of the process (worker threads included; PGlite's memory too).
 * Targets: validate + commit under 10 s, peak RSS under 500 MB.
 * Writes bench/results/import.json.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { eq, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { loadConfig } from '../server/config.js';
import type { AppContext } from '../server/context.js';
import { openDatabase } from '../server/db/client.js';
import { users } from '../server/db/schema/index.js';
import { ImportJobs, getImport, stageImport, startCommit } from '../server/imports/imports-service.js';
import { closeValidationPool } from '../server/imports/validation-pool.js';
import { buildDemoCoop } from '../seed/demo-coop.js';
import { loadDemoCoop } from '../seed/load-demo.js';
import { seededRandom } from '../seed/random.js';

const args = process.argv.slice(2);
const arg = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] ? args[i + 1] : fallback;
};
const ROWS = Number(arg('rows', '100000'));
const DB = arg('db', 'tmp');
const PREPARE = arg('prepare', '');
const root = path.join(path.dirname(fileURLToPath(import.meta.url)), '..');
const mb = (bytes: number) => Math.round((bytes / 1024 / 1024) * 10) / 10;

const loadAtStart = os.loadavg().map((x) => Math.round(x * 100) / 100);
let peakSampled = 0;
const sampler = setInterval(() => (peakSampled = Math.max(peakSampled, process.memoryUsage().rss)), 10);
sampler.unref();

/** A price file in the import layout: every item, season and delivery point, one observation a day. */
function generateCsv(rows: number): string {
  const demo = buildDemoCoop();
  const rnd = seededRandom(4242);
  const lines = ['item,season,delivery_point,price,unit,currency,source,observed_on'];
  const combos = demo.seasons.flatMap((s) => demo.items.flatMap((it) => demo.deliveryPoints.map((dp) => ({ s, it, dp }))));
  const perCombo = Math.ceil(rows / combos.length);
  outer: for (let day = 0; day < perCombo; day++) {
    for (const { s, it, dp } of combos) {
      if (lines.length > rows) break outer;
      // Days from 1 September, away from the demo's own dates (15 Aug, 1 Oct, 1 Mar) only by chance.
      const date = DateTime.utc(s.startYear, 9, 1).plus({ days: day }).toISODate();
      const price = Math.round(it.basePrice * (0.8 + 0.4 * rnd.next()) * 1000) / 1000;
      lines.push(`${it.code},${s.label},${dp.name},${price},${it.unit},EUR,Benchmark daily quote,${date}`);
    }
  }
  return `${lines.join('\n')}\n`;
}

/**
 * Child process: creates the database with the demo co-op in `dir`, and writes the CSV beside it
 * (the server receives an upload as bytes; building the file's 100,000 lines as strings here
 * would leave tens of MB of garbage in the measured heap).
 */
async function prepare(dir: string) {
  const database = await openDatabase({ dataDir: dir });
  await loadDemoCoop(database.db);
  await database.close();
  fs.writeFileSync(`${dir}.csv`, generateCsv(ROWS));
}

async function main() {
  const tmp = DB === 'tmp' ? fs.mkdtempSync(path.join(os.tmpdir(), 'netput-import-bench-')) : null;
  if (tmp) {
    const child = spawnSync(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), '--prepare', path.join(tmp, 'pglite'), '--rows', String(ROWS)], { stdio: 'inherit' });
    if (child.status !== 0) throw new Error('preparing the database failed');
  }
  const rssBeforeDb = process.memoryUsage().rss;
  const database = await openDatabase({ dataDir: tmp ? path.join(tmp, 'pglite') : 'memory://' });
  if (!tmp) await loadDemoCoop(database.db);
  const rssAfterDb = process.memoryUsage().rss;
  const ctx = { db: database.db, dbKind: database.kind, config: loadConfig({ LOG_LEVEL: 'silent' }, []) } as unknown as AppContext;
  const [planner] = await database.db.select({ id: users.id }).from(users).where(eq(users.email, 'planner@example.org'));
  const jobs = new ImportJobs();

  const csv = tmp ? fs.readFileSync(path.join(tmp, 'pglite.csv')) : Buffer.from(generateCsv(ROWS));
  const countPrices = async () => Number(((await database.db.execute(sql`select count(*)::int as n from price_observations`)) as unknown as { rows: { n: number }[] }).rows[0].n);
  const pricesBefore = await countPrices();

  // The worker thread starts once per process (tsx compiles the validator there): timed apart.
  let t0 = performance.now();
  await stageImport(ctx, jobs, { bytes: Buffer.from('item,season,delivery_point,price,observed_on\nwheat,2014/15,Larkfield terminal,1,2014-09-01\n'), fileName: 'warm-up.csv', kind: 'prices' }, planner.id);
  const workerStartMs = performance.now() - t0;
  const baselineRss = process.memoryUsage().rss;

  t0 = performance.now();
  let c0 = process.cpuUsage();
  const staged = await stageImport(ctx, jobs, { bytes: csv, fileName: 'bench-prices.csv', kind: 'prices' }, planner.id);
  const validateMs = performance.now() - t0;
  const validateCpu = process.cpuUsage(c0);
  const rssAfterValidate = process.memoryUsage().rss;
  const peakDuringValidate = Math.max(peakSampled, process.resourceUsage().maxRSS * 1024);
  if (staged.errorCount) throw new Error(`the generated file has errors: ${JSON.stringify(staged.errors.slice(0, 3))}`);

  t0 = performance.now();
  c0 = process.cpuUsage();
  await startCommit(ctx, jobs, staged.id, 'update', planner.id, (err) => console.error(err));
  await jobs.idle();
  const commitMs = performance.now() - t0;
  const commitCpu = process.cpuUsage(c0);
  const final = await getImport(ctx, jobs, staged.id);
  if (final.status !== 'committed') throw new Error(`the commit failed: ${final.failure}`);
  const pricesAfter = await countPrices();

  clearInterval(sampler);
  const peakRss = Math.max(peakSampled, process.resourceUsage().maxRSS * 1024);
  const result = {
    benchmark: 'import: 100,000-row price CSV, validate then commit',
    date: new Date().toISOString(),
    machine: { cpus: os.cpus().length, cpu: os.cpus()[0]?.model ?? null, node: process.version, loadAverageAtStart: loadAtStart, loadAverageAtEnd: os.loadavg().map((x) => Math.round(x * 100) / 100) },
    database: tmp ? 'PGlite in a temp dir (created by a child process, opened here)' : 'PGlite in memory (created in this process)',
    rows: staged.totalRows,
    fileMb: mb(csv.length),
    workerStartMs: Math.round(workerStartMs),
    validateMs: Math.round(validateMs),
    commitMs: Math.round(commitMs),
    totalMs: Math.round(validateMs + commitMs),
    /** CPU time of all the process's threads in each phase: what the phases cost on an idle machine, at most. */
    validateCpuMs: Math.round((validateCpu.user + validateCpu.system) / 1000),
    commitCpuMs: Math.round((commitCpu.user + commitCpu.system) / 1000),
    rowsPerSecond: { validate: Math.round(staged.totalRows / (validateMs / 1000)), commit: Math.round(staged.totalRows / (commitMs / 1000)) },
    counts: final.counts,
    priceRows: { before: pricesBefore, after: pricesAfter },
    rssBeforeDatabaseMb: mb(rssBeforeDb),
    rssAfterDatabaseMb: mb(rssAfterDb),
    baselineRssMb: mb(baselineRss),
    rssAfterValidateMb: mb(rssAfterValidate),
    peakRssDuringValidateMb: mb(peakDuringValidate),
    rssAfterCommitMb: mb(process.memoryUsage().rss),
    peakRssMb: mb(peakRss),
    targets: { totalMs: 10_000, peakRssMb: 500 },
    notes: [
      ...(loadAtStart[0] > os.cpus().length
        ? [`The machine was shared: load average ${loadAtStart[0]} on ${os.cpus().length} cores at the start, so wall times are inflated; the CPU times (all threads) show the work itself.`]
        : []),
      `Before the import the process already held ${mb(baselineRss)} MB (Node and tsx ${mb(rssBeforeDb)} MB, the PGlite database ${mb(rssAfterDb - rssBeforeDb)} MB, the started validation worker thread ${mb(baselineRss - rssAfterDb)} MB); the import itself added ${mb(peakRss - baselineRss)} MB at its peak.`,
    ],
    met: { total: validateMs + commitMs < 10_000, peakRss: mb(peakRss) < 500 },
  };
  fs.mkdirSync(path.join(root, 'bench/results'), { recursive: true });
  fs.writeFileSync(path.join(root, 'bench/results/import.json'), `${JSON.stringify(result, null, 2)}\n`);
  console.log(JSON.stringify(result, null, 2));
  await closeValidationPool();
  await database.close();
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
}

if (PREPARE) await prepare(PREPARE);
else await main();
