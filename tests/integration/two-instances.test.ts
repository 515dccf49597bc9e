import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { MIGRATIONS_DIR } from '../../server/db/client.js';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp.js';
import { HttpSession, startServerProcess, type ServerProcess } from './server-process.js';
import { demoModel } from '../../seed/demo-model.js';

/**
 * Two app instances on one PostgreSQL database: sessions, rate-limit counters and background jobs
 * live in the database, so both instances share them and every job runs exactly once.
 */
// Server-only checks run in the PostgreSQL suite (npm run test:postgres).
const serverUrl = process.env.NETPUT_TEST_DB === 'postgres' ? process.env.TEST_DATABASE_URL : undefined;
const name = `netput_two_${randomBytes(4).toString('hex')}`;
let a: ServerProcess;
let b: ServerProcess;
let smtp: FakeSmtp;
let dbUrl: string;
let firstRunId: number;

describe.runIf(serverUrl)('two instances on one PostgreSQL database', () => {
  beforeAll(async () => {
    const admin = new pg.Client({ connectionString: serverUrl });
    await admin.connect();
    await admin.query(`create database ${name}`);
    await admin.end();
    const u = new URL(serverUrl!);
    u.pathname = `/${name}`;
    dbUrl = u.toString();
    smtp = await startFakeSmtp();
    // Both start together on the empty database: one migrates and loads the demo under the migration
    // advisory lock, the other waits for it and finds both done (neither dies on the other's tables).
    [a, b] = await Promise.all([startServerProcess({ DATABASE_URL: dbUrl, SMTP_URL: smtp.url }), startServerProcess({ DATABASE_URL: dbUrl, SMTP_URL: smtp.url })]);
  }, 240_000);

  it('two instances started together on an empty database both run, with the demo loaded once', async () => {
    const c = new pg.Client({ connectionString: dbUrl });
    await c.connect();
    const { rows } = await c.query<{ n: string; emails: string }>(`select count(*) as n, count(distinct email) as emails from users`);
    const migrations = await c.query<{ n: string }>(`select count(*) as n from drizzle.__drizzle_migrations`);
    await c.end();
    expect(Number(rows[0]!.n)).toBeGreaterThan(0);
    expect(rows[0]!.n).toBe(rows[0]!.emails);
    const journal = JSON.parse(fs.readFileSync(path.join(MIGRATIONS_DIR, 'meta', '_journal.json'), 'utf8')) as { entries: unknown[] };
    expect(Number(migrations.rows[0]!.n)).toBe(journal.entries.length);
    expect((await fetch(`${a.url}/api/health`)).ok).toBe(true);
    expect((await fetch(`${b.url}/api/health`)).ok).toBe(true);
  });

  afterAll(async () => {
    await a?.stop();
    await b?.stop();
    await smtp?.close();
    const admin = new pg.Client({ connectionString: serverUrl });
    await admin.connect();
    await admin.query(`drop database if exists ${name} with (force)`);
    await admin.end();
  }, 60_000);

  it('a session made on one instance works on the other', async () => {
    const s = new HttpSession(a.url);
    expect((await s.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' })).status).toBe(200);
    const me = await s.at(b.url).request('GET', '/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.email).toBe('planner@example.org');
  });

  it('fits queued on either instance each run exactly once', async () => {
    const s = new HttpSession(a.url);
    await s.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' });
    const sb = s.at(b.url);
    const definition = demoModel({ items: ['wheat', 'canola', 'nitrogen', 'labour'], curvature: 'check', backtestSeasons: 0 });
    const model = await s.request('POST', '/api/models', { name: 'Two-instance model', definition });
    expect(model.status).toBe(201);
    const runIds: number[] = [];
    for (let i = 0; i < 6; i++) {
      const r = await (i % 2 ? sb : s).request('POST', `/api/models/${model.body.id}/runs`);
      expect(r.status).toBe(202);
      runIds.push(r.body.id);
    }
    const deadline = Date.now() + 180_000;
    let statuses: string[] = [];
    while (Date.now() < deadline) {
      statuses = await Promise.all(runIds.map(async (id) => (await sb.request('GET', `/api/model-runs/${id}/status`)).body.status));
      if (statuses.every((st) => st === 'succeeded' || st === 'failed')) break;
      await new Promise((r) => setTimeout(r, 500));
    }
    expect(statuses).toEqual(runIds.map(() => 'succeeded'));
    const c = new pg.Client({ connectionString: dbUrl });
    await c.connect();
    const { rows } = await c.query<{ ref_id: number; attempts: number; status: string; locked_by: string }>(
      `select ref_id, attempts, status, locked_by from jobs where kind = 'fit' order by ref_id`,
    );
    await c.end();
    expect(rows.map((r) => r.ref_id)).toEqual(runIds);
    expect(rows.every((r) => r.attempts === 1 && r.status === 'done')).toBe(true);
    firstRunId = runIds[0];
  }, 240_000);

  it('an outlook published on one instance reaches every subscribed member exactly once', async () => {
    const s = new HttpSession(b.url);
    await s.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' });
    const draft = await s.request('POST', '/api/outlooks', { season: '2026/27', modelRunId: firstRunId });
    expect(draft.status).toBe(201);
    expect((await s.request('POST', `/api/outlooks/${draft.body.id}/projection`)).status).toBe(202);
    const deadline = Date.now() + 180_000;
    while (Date.now() < deadline && (await s.at(a.url).request('GET', `/api/outlooks/${draft.body.id}/projection`)).body.status !== 'succeeded') {
      await new Promise((r) => setTimeout(r, 500));
    }
    smtp.clear();
    const published = await s.request('POST', `/api/outlooks/${draft.body.id}/publish`, { commentary: 'Two-instance outlook' });
    expect(published.status).toBe(201);
    const queued = published.body.mails.queued as number;
    expect(queued).toBeGreaterThan(0);
    await smtp.waitFor(queued, 120_000);
    // Give both dispatchers time to (wrongly) send anything twice before counting.
    await new Promise((r) => setTimeout(r, 3000));
    const recipients = smtp.messages().flatMap((m) => m.to);
    expect(recipients).toHaveLength(queued);
    expect(new Set(recipients).size).toBe(queued);
    const log = await s.request('GET', `/api/outlooks/${draft.body.id}/deliveries`);
    expect(log.body.counts.sent).toBe(queued);
  }, 300_000);

  it('sign-in attempts are counted across both instances', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) {
      const s = new HttpSession(i % 2 ? b.url : a.url);
      statuses.push((await s.request('POST', '/api/auth/login', { email: 'shared-limit@example.org', password: 'wrong-password-1' })).status);
    }
    expect(statuses[10]).toBe(429);
  }, 120_000);
});
