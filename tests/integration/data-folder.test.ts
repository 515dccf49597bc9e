/**
 * One process per embedded data folder, live backups, and what a restart does after a kill — with
 * real processes (`tsx server/main.ts` and the npm commands' scripts) on one temporary PGlite folder:
 *
 *  - a second server, and `db:export`, on a folder a server holds are refused with one line naming
 *    the holder (pid, command, since when); nothing is opened;
 *  - `npm run backup` while the server runs goes through the server and restores to exactly the
 *    rows the folder holds (the server is SIGKILLed right after, so nothing changes in between);
 *  - the lock of a SIGKILLed server is taken over (in-process here, then by a new server);
 *  - a fit running when its server is SIGKILLed is taken up by the restarted server at once,
 *    not after its 60 s lease;
 *  - every price the servers confirmed (201) is in the folder at the end;
 *  - restoring a damaged backup prints one line and changes nothing.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { inArray } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/client.js';
import { exportDatabase } from '../../server/db/portable.js';
import { restorePglite } from '../../server/db/backup.js';
import { priceObservations } from '../../server/db/schema/index.js';
import { loadDemoCoop } from '../../seed/load-demo.js';
import { HttpSession, startServerProcess, type ServerProcess } from './server-process.js';
import { demoModel } from '../../seed/demo-model.js';
import { until } from '../polling.js';

const ROOT = path.resolve(import.meta.dirname, '..', '..');
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-folder-'));
const dataDir = path.join(tmp, 'data');
const pgliteDir = path.join(dataDir, 'pglite');
const env = { DATA_DIR: dataDir, DATABASE_URL: '', SMTP_URL: 'smtp://127.0.0.1:9' };
const servers: ServerProcess[] = [];

afterAll(async () => {
  for (const s of servers) await s.stop('SIGKILL');
  fs.rmSync(tmp, { recursive: true, force: true });
});

/** Runs one of the npm commands' scripts (as `npm run x` does) on the test's folder. */
function command(script: string, ...args: string[]) {
  const r = spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), [script, ...args], {
    cwd: ROOT,
    env: { ...process.env, ...env, LOG_LEVEL: 'silent' },
    encoding: 'utf8',
    timeout: 120_000,
  });
  return { status: r.status, stdout: r.stdout.trim(), stderr: r.stderr.trim() };
}

/** The claim file of the folder's lock: the process that holds it. */
function holder(): { pid: number; command: string; backupSocket?: string } {
  const dir = `${pgliteDir}.lock`;
  const top = fs.readdirSync(dir).filter((n) => /^\d+\.json$/.test(n)).sort().at(-1)!;
  return JSON.parse(fs.readFileSync(path.join(dir, top), 'utf8'));
}

async function start() {
  const s = await startServerProcess(env);
  servers.push(s);
  return s;
}

async function signIn(s: ServerProcess) {
  const planner = new HttpSession(s.url);
  expect((await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' })).status).toBe(200);
  return planner;
}

let template: typeof priceObservations.$inferInsert;
const confirmed: number[] = [];
let n = 0;

/** A price like one the demo holds (so no plausibility rule questions it), on a new day; its id once confirmed (201). */
async function addPrice(planner: HttpSession) {
  n++;
  const observedOn = new Date(Date.UTC(2031, 0, n)).toISOString().slice(0, 10);
  const r = await planner.request('POST', '/api/prices', {
    rows: [{ itemId: template.itemId, seasonId: template.seasonId, deliveryPointId: template.deliveryPointId, price: Number(template.price), currency: template.currency, source: `folder test ${n}`, observedOn }],
  });
  expect(r.status, JSON.stringify(r.body)).toBe(201);
  const id = (Array.isArray(r.body) ? r.body[0] : (r.body.rows?.[0] ?? r.body)).id as number;
  confirmed.push(id);
  return id;
}

async function fitDefinition(planner: HttpSession) {
  const model = await planner.request('POST', '/api/models', {
    name: `Folder test model ${Date.now()}`,
    definition: demoModel({ backtestSeasons: 5 }),
  });
  expect(model.status, JSON.stringify(model.body)).toBe(201);
  return model.body.id as number;
}

describe.skipIf(process.env.NETPUT_TEST_DB === 'postgres')('one process per data folder', () => {
  it('refuses a second opener, backs up through the running server, and takes over a killed holder’s lock', async () => {
    // The folder, with the demo co-op, made by this process (which then lets go of it).
    const first = await openDatabase({ dataDir: pgliteDir, purpose: 'test' });
    await loadDemoCoop(first.db);
    [template] = await first.db.select().from(priceObservations).limit(1);
    await first.close();
    expect(fs.readdirSync(`${pgliteDir}.lock`).filter((f) => f.endsWith('.json'))).toEqual([]);

    const a = await start();
    const planner = await signIn(a);
    for (let i = 0; i < 3; i++) await addPrice(planner);
    const held = holder();
    expect(held.command).toBe('server: server/main.ts');

    // A second server on the same folder is refused with one line naming the holder.
    await expect(startServerProcess(env, 60_000)).rejects.toThrow(
      new RegExp(`Netput could not start: The data folder .*pglite is in use by another Netput process: pid ${held.pid} \\(server: server/main\\.ts\\), since \\d{4}-\\d\\d-\\d\\d \\d\\d:\\d\\d:\\d\\d UTC\\. Stop it first\\.`),
    );
    // So is any command that would open it.
    const exported = command('server/db/database-cli.ts', 'export', path.join(tmp, 'x.json'));
    expect(exported.status).toBe(1);
    expect(exported.stderr).toMatch(new RegExp(`^db:export failed: The data folder .* in use by another Netput process: pid ${held.pid} \\(server: `));
    expect(exported.stderr.split('\n')).toHaveLength(1);
    expect(fs.existsSync(path.join(tmp, 'x.json'))).toBe(false);
    // The first server still works.
    await addPrice(planner);

    // A backup while it runs is taken by the server; kill it right after, so the folder holds what the backup saw.
    const file = path.join(tmp, 'live.tar.gz');
    const backup = command('server/db/backup-cli.ts', 'backup', file);
    expect(backup.stderr).toBe('');
    expect(backup.stdout).toBe(`Backup written to ${file} (through the running server)`);
    const socket = holder().backupSocket!;
    expect(path.dirname(socket)).toBe(`${pgliteDir}.lock`);
    expect(fs.statSync(socket).isSocket()).toBe(true);
    await a.stop('SIGKILL');

    // The dead server's lock is taken over; the folder and the backup hold identical rows.
    const after = await openDatabase({ dataDir: pgliteDir, purpose: 'test' });
    const live = await exportDatabase(after.db);
    await after.close();
    expect(fs.existsSync(socket), 'the dead server’s backup socket is gone with its lock').toBe(false);
    const restoredDir = path.join(tmp, 'restored', 'pglite');
    expect(await restorePglite(file, restoredDir)).toBeNull();
    const restored = await openDatabase({ dataDir: restoredDir, purpose: 'test' });
    const fromBackup = await exportDatabase(restored.db);
    await restored.close();
    expect(fromBackup.tables.map((t) => t.rows.length)).toEqual(live.tables.map((t) => t.rows.length));
    expect(fromBackup.tables).toEqual(live.tables);
    expect(live.tables.find((t) => t.name === 'price_observations')!.rows.map((r) => (r as { id: number }).id)).toEqual(expect.arrayContaining(confirmed));

    // Restoring a damaged backup: one line, nothing changed.
    const damaged = path.join(tmp, 'damaged.tar.gz');
    fs.writeFileSync(damaged, fs.readFileSync(file).subarray(0, 20_000));
    const before = fs.readdirSync(dataDir).sort();
    const r = command('server/db/backup-cli.ts', 'restore', damaged);
    expect(r.status).toBe(1);
    expect(r.stderr).toBe(`${damaged} is not a usable Netput backup: it is cut short. Nothing was changed.`);
    expect(fs.readdirSync(dataDir).sort()).toEqual(before);
  }, 300_000);

  it('a server killed during a fit is replaced by one that takes the lock over and runs the fit at once', async () => {
    const b = await start();
    let planner = await signIn(b);
    const modelId = await fitDefinition(planner);
    const run = await planner.request('POST', `/api/models/${modelId}/runs`);
    expect(run.status).toBe(202);
    const runStatus = async () => (await planner.request('GET', `/api/model-runs/${run.body.id}/status`)).body.status as string;
    await until('the fit to start', async () => ((await runStatus()) === 'running' ? true : undefined), 60_000, 20);
    await addPrice(planner);
    // The server renews its lease every second, so the lease would run until at least 59 s after the kill.
    const leaseEndsAfter = Date.now() + 55_000;
    await b.stop('SIGKILL');

    // The new server takes the dead one's lock, and its fit, at once (the lease would run 60 s).
    const c = await start();
    planner = await signIn(c);
    const status = await until('the fit on the new server', async () => {
      const s = await runStatus();
      return ['succeeded', 'failed'].includes(s) ? s : undefined;
    }, 120_000, 200);
    expect(status).toBe('succeeded');
    await addPrice(planner);
    await c.stop('SIGKILL');

    // Every price a server confirmed is in the folder.
    const end = await openDatabase({ dataDir: pgliteDir, purpose: 'test' });
    const found = await end.db.select({ id: priceObservations.id }).from(priceObservations).where(inArray(priceObservations.id, confirmed));
    const [job] = await end.db.execute(`select attempts, status from jobs where kind = 'fit' and ref_id = ${Number(run.body.id)}`).then((x) => (x as unknown as { rows: { attempts: number; status: string }[] }).rows);
    // The restarted server set the run going again when it took the job: before the old lease ran out.
    const [again] = await end.db.execute(`select started_at from model_runs where id = ${Number(run.body.id)}`).then((x) => (x as unknown as { rows: { started_at: string | Date }[] }).rows);
    await end.close();
    expect(new Date(again!.started_at).getTime(), 'the fit was taken up before its 60 s lease ran out').toBeLessThan(leaseEndsAfter);
    expect(found.map((f) => f.id).sort((x, y) => x - y)).toEqual([...confirmed].sort((x, y) => x - y));
    expect(job).toEqual({ attempts: 2, status: 'done' });
  }, 300_000);
});
