/**
 * Kill the server (SIGKILL) in the middle of committing a large price import, start it again on
 * the same data, and check that the import left nothing behind: the price table is exactly as it
 * was, the import is reported as stopped (failed, nothing written) and can be committed again, and
 * that second commit writes every row. The server runs as a child process (`tsx server/main.ts`)
 * on PGlite, or on the PostgreSQL server in the PostgreSQL suite (a fresh database per run).
 * IMPORT_CHUNK_DELAY_MS pauses the commit after each chunk of rows, inside its transaction, so the
 * kill lands with part of the file written and not yet committed.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { buildDemoCoop } from '../../seed/demo-coop.js';
import { HttpSession, startServerProcess, type ServerProcess } from './server-process.js';
import { sleep, until } from '../polling.js';

const ROWS = 120_000;
/** Every stored price, read window by window as the prices grid reads them (at most 1,000 a request). */
async function allPrices(session: HttpSession): Promise<{ id: number }[]> {
  const rows: { id: number }[] = [];
  for (let offset = 0; ; offset += 1000) {
    const res = await session.request('GET', `/api/prices?offset=${offset}&limit=1000`);
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    const page = res.body as { id: number }[];
    rows.push(...page);
    if (page.length < 1000) return rows;
  }
}

/** A price file in the import layout, every row new (days after 1 September of each season). */
function priceCsv(rows: number): Buffer {
  const demo = buildDemoCoop();
  const lines = ['item,season,delivery_point,price,unit,currency,source,observed_on'];
  const combos = demo.seasons.flatMap((s) => demo.items.flatMap((it) => demo.deliveryPoints.map((dp) => ({ s, it, dp }))));
  for (let i = 0; lines.length <= rows; i++) {
    const { s, it, dp } = combos[i % combos.length]!;
    const day = 2 + Math.floor(i / combos.length);
    const date = new Date(Date.UTC(s.startYear, 8, 1) + day * 86_400_000).toISOString().slice(0, 10);
    lines.push(`${it.code},${s.label},${dp.name},${(it.basePrice * (1 + (i % 97) / 500)).toFixed(2)},${it.unit},EUR,Crash test quote,${date}`);
  }
  return Buffer.from(`${lines.join('\n')}\n`);
}

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-import-crash-'));
const onPostgres = process.env.NETPUT_TEST_DB === 'postgres' && !!process.env.TEST_DATABASE_URL;
let dbUrl = '';
let server: ServerProcess | undefined;

async function start(): Promise<ServerProcess> {
  // Each chunk of 2,000 rows pauses 40 ms inside the transaction: a window for the kill.
  return startServerProcess({ DATA_DIR: dataDir, DATABASE_URL: dbUrl, SMTP_URL: 'smtp://127.0.0.1:9', IMPORT_CHUNK_DELAY_MS: '40' });
}

afterAll(async () => {
  await server?.stop('SIGKILL');
  fs.rmSync(dataDir, { recursive: true, force: true });
  if (dbUrl) {
    const admin = new pg.Client({ connectionString: process.env.TEST_DATABASE_URL });
    await admin.connect();
    await admin.query(`drop database if exists ${new URL(dbUrl).pathname.slice(1)} with (force)`);
    await admin.end();
  }
});

describe('an import commit interrupted by a crash', () => {
  it('leaves the database as it was, and the import can be committed again', async () => {
    if (onPostgres) {
      const name = `netput_crash_${process.pid}_${Date.now()}`;
      const admin = new pg.Client({ connectionString: process.env.TEST_DATABASE_URL });
      await admin.connect();
      await admin.query(`create database ${name}`);
      await admin.end();
      const u = new URL(process.env.TEST_DATABASE_URL!);
      u.pathname = `/${name}`;
      dbUrl = u.toString();
    }
    server = await start();
    let planner = new HttpSession(server.url);
    expect((await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' })).status).toBe(200);
    const before = await allPrices(planner);
    expect(before.length).toBeGreaterThan(0);

    const staged = await planner.upload('/api/imports', { kind: 'prices' }, { name: 'crash-prices.csv', bytes: priceCsv(ROWS) });
    expect(staged.status, JSON.stringify(staged.body).slice(0, 300)).toBe(201);
    expect(staged.body.errorCount).toBe(0);
    expect(staged.body.totalRows).toBe(ROWS);
    const commit = await planner.request('POST', `/api/imports/${staged.body.id}/commit`, { onExisting: 'skip' });
    expect(commit.status).toBe(202);

    // Kill once some rows have been written inside the commit's transaction, before it ends.
    let seen: { done: number; total: number } | null = null;
    for (const end = Date.now() + 60_000; Date.now() < end; ) {
      const s = (await planner.request('GET', `/api/imports/${staged.body.id}`)).body as { status: string; progress: { done: number; total: number } };
      expect(s.status).toBe('committing');
      if (s.progress.done > 0 && s.progress.done < s.progress.total) {
        seen = s.progress;
        break;
      }
      await sleep(5);
    }
    expect(seen, 'the commit was seen part-way').not.toBeNull();
    await server.stop('SIGKILL');

    server = await start();
    planner = new HttpSession(server.url);
    expect((await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' })).status).toBe(200);
    const after = await allPrices(planner);
    expect(after.map((p) => p.id).sort((a, b) => a - b)).toEqual(before.map((p) => p.id).sort((a, b) => a - b));

    const stopped = (await planner.request('GET', `/api/imports/${staged.body.id}`)).body;
    expect(stopped.status).toBe('failed');
    expect(stopped.failure).toMatch(/server stopped during the commit; nothing was written/);

    const again = await planner.request('POST', `/api/imports/${staged.body.id}/commit`, { onExisting: 'skip' });
    expect(again.status, JSON.stringify(again.body)).toBe(202);
    type Final = { status: string; failure: string | null; counts: { inserted: number; skipped: number } | null };
    const final = await until(
      'the second commit',
      async () => {
        const i = (await planner.request('GET', `/api/imports/${staged.body.id}`)).body as Final;
        return i.status !== 'committing' ? i : undefined;
      },
      120_000,
      200,
    );
    expect(final.status).toBe('committed');
    // The stopped attempt's note does not stay on the committed import.
    expect(final.failure).toBeNull();
    expect((await planner.request('GET', `/api/imports/${staged.body.id}`)).body.failure).toBeNull();
    // A few generated dates may coincide with the demo's own quotes: those rows exist and are skipped.
    expect(final.counts!.inserted + final.counts!.skipped).toBe(ROWS);
    expect(final.counts!.inserted).toBeGreaterThan(ROWS * 0.99);
    expect((await allPrices(planner)).length).toBe(before.length + final.counts!.inserted);
    await server.stop('SIGTERM');
    server = undefined;
  }, 300_000);
});
