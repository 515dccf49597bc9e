/**
 * Server-mode benchmark (loopback only, bounded in time): two app instances on one PostgreSQL
 * database; 10 planners editing prices and starting fits while 500 members read the published
 * outlook. Writes bench/results/server-mode.json.
 *
 *   TEST_DATABASE_URL=postgres://postgres@127.0.0.1:5432/test npm run bench:server-mode [-- --seconds 20]
 *
 * The 480 extra members (and their farms) are inserted straight into the database with the demo
 * password's hash, and their sessions as rows, so the benchmark measures reading, not 500 argon2 sign-ins.
 */
import fs from 'node:fs';
import os from 'node:os';
import { createHash, randomBytes } from 'node:crypto';
import autocannon from 'autocannon';
import pg from 'pg';
import { HttpSession, startServerProcess, type ServerProcess } from '../tests/integration/server-process.js';
import { demoModel } from '../seed/demo-model.js';

const serverUrl = process.env.TEST_DATABASE_URL;
if (!serverUrl) {
  console.error('Set TEST_DATABASE_URL to a PostgreSQL server, e.g. postgres://postgres@127.0.0.1:5432/test');
  process.exit(2);
}
const secondsArg = process.argv.indexOf('--seconds');
const seconds = secondsArg > 0 ? Number(process.argv[secondsArg + 1]) : 20;
const MEMBERS = 500;
const PLANNERS = 10;
const name = `netput_bench_${randomBytes(4).toString('hex')}`;

function percentile(sorted: number[], p: number) {
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] : NaN;
}

async function waitFor(check: () => Promise<boolean>, what: string, ms = 300_000) {
  const deadline = Date.now() + ms;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`${what} did not finish in time`);
}

const admin = new pg.Client({ connectionString: serverUrl });
await admin.connect();
await admin.query(`create database ${name}`);
const dbUrl = new URL(serverUrl);
dbUrl.pathname = `/${name}`;
const servers: ServerProcess[] = [];
const db = new pg.Client({ connectionString: dbUrl.toString() });
try {
  servers.push(await startServerProcess({ DATABASE_URL: dbUrl.toString(), SMTP_URL: 'smtp://127.0.0.1:9' }));
  servers.push(await startServerProcess({ DATABASE_URL: dbUrl.toString(), SMTP_URL: 'smtp://127.0.0.1:9' }));
  const [a, b] = servers;
  await db.connect();

  // 480 more members, each with a farm of its own, so 500 members read their own part.
  const { rows: hashRow } = await db.query<{ password_hash: string }>(`select password_hash from users where email = 'member@example.org'`);
  const { rows: season } = await db.query<{ id: number }>(`select id from seasons order by start_year desc limit 1`);
  for (let i = 21; i <= MEMBERS; i++) {
    const { rows } = await db.query<{ id: number }>(`insert into users (email, name, role, password_hash) values ($1, $2, 'member', $3) returning id`, [
      `bench.member.${i}@example.org`,
      `Bench Member ${i}`,
      hashRow[0].password_hash,
    ]);
    const land = 150 + ((i * 37) % 700);
    const { rows: farm } = await db.query<{ id: number }>(
      `insert into farms (code, name, region, land_ha) values ($1, $2, 'Riverlands', $3) returning id`,
      [`B${String(i).padStart(3, '0')}`, `Bench Farm ${i}`, land],
    );
    await db.query(`update users set farm_id = $1 where id = $2`, [farm[0].id, rows[0].id]);
    await db.query(`insert into farm_season_factors (farm_id, season_id, factor, value) values ($1, $2, 'land_ha', $3)`, [farm[0].id, season[0].id, land]);
  }

  // The planner fits a model, projects 2026/27 and publishes it (without e-mail).
  const planner = new HttpSession(a.url);
  await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' });
  const definition = demoModel({ backtestSeasons: 0 });
  const model = await planner.request('POST', '/api/models', { name: 'Bench model', definition });
  const run = await planner.request('POST', `/api/models/${model.body.id}/runs`);
  await waitFor(async () => (await planner.request('GET', `/api/model-runs/${run.body.id}/status`)).body.status === 'succeeded', 'the fit');
  const outlook = await planner.request('POST', '/api/outlooks', { season: '2026/27', modelRunId: run.body.id });
  if (outlook.status !== 201) throw new Error(`outlook: ${JSON.stringify(outlook.body)}`);
  const projection = await planner.request('POST', `/api/outlooks/${outlook.body.id}/projection`);
  if (projection.status !== 202) throw new Error(`projection: ${JSON.stringify(projection.body)}`);
  await waitFor(async () => (await planner.request('GET', `/api/outlooks/${outlook.body.id}/projection`)).body.status === 'succeeded', 'the projection');
  const published = await planner.request('POST', `/api/outlooks/${outlook.body.id}/publish`, { commentary: 'Benchmark outlook', notifyMembers: false });
  if (published.status !== 201) throw new Error(`publish: ${JSON.stringify(published.body)}`);

  // Sessions for every member, as rows.
  const { rows: members } = await db.query<{ id: number }>(`select id from users where role = 'member' order by id`);
  const memberCookies: string[] = [];
  for (const m of members) {
    const token = randomBytes(32).toString('base64url');
    await db.query(`insert into sessions (id, user_id, expires_at) values ($1, $2, now() + interval '1 day')`, [
      createHash('sha256').update(token).digest('hex'),
      m.id,
    ]);
    memberCookies.push(`netput_sid=${token}`);
  }

  // 10 planners: edit a price, read the grid, start a fit now and then, on both instances.
  // Ten planner clients share the planner's session (ten sign-ins from one address would meet the
  // sign-in rate limit, which is working as intended).
  const planners = Array.from({ length: PLANNERS }, (_, i) => planner.at(i % 2 ? b.url : a.url));
  const plannerLatency: number[] = [];
  let plannerErrors = 0;
  let fits = 0;
  let stop = false;
  const prices = (await planner.request('GET', '/api/prices')).body as { id: number; itemId: number; seasonId: number; deliveryPointId: number; price: number; currency: string; source: string; observedOn: string }[];
  const plannerLoops = planners.map(async (s, i) => {
    let n = 0;
    while (!stop) {
      const p = prices[(i * 31 + n * 7) % prices.length];
      const t0 = performance.now();
      const put = await s.request('PUT', `/api/prices/${p.id}`, { ...p, price: Math.round(p.price * (1 + ((n % 5) - 2) / 1000) * 100) / 100 });
      const list = await s.request('GET', `/api/prices?items=${p.itemId}`);
      plannerLatency.push(performance.now() - t0);
      if (put.status !== 200 || list.status !== 200) plannerErrors++;
      if (n % 10 === 9) {
        const r = await s.request('POST', `/api/models/${model.body.id}/runs`);
        if (r.status === 202) fits++;
        else plannerErrors++;
      }
      n++;
    }
  });

  const latencies: number[] = [];
  const statuses: Record<string, number> = {};
  const read = (url: string) =>
    new Promise<autocannon.Result>((resolve) => {
      let k = 0;
      const inst = autocannon({
        url,
        connections: MEMBERS / 2 / 5,
        duration: seconds,
        requests: [
          {
            method: 'GET',
            path: '/api/portal/outlook',
            setupRequest: (req: { headers?: Record<string, string> }) => ({ ...req, headers: { ...req.headers, cookie: memberCookies[k++ % memberCookies.length] } }),
          },
        ],
      });
      inst.on('response', (_c: unknown, status: number, _b: number, ms: number) => {
        latencies.push(ms);
        statuses[status] = (statuses[status] ?? 0) + 1;
      });
      inst.then(resolve);
    });
  const started = Date.now();
  const [ra, rb] = await Promise.all([read(a.url), read(b.url)]);
  stop = true;
  await Promise.all(plannerLoops);
  const elapsed = (Date.now() - started) / 1000;
  latencies.sort((x, y) => x - y);
  plannerLatency.sort((x, y) => x - y);
  const errors = ra.errors + ra.timeouts + (ra.non2xx ?? 0) + rb.errors + rb.timeouts + (rb.non2xx ?? 0);
  const report = {
    benchmark: `2 instances on PostgreSQL; ${PLANNERS} planners editing and fitting while ${MEMBERS} members read the published outlook`,
    at: new Date().toISOString(),
    machine: { cpus: os.cpus().length, node: process.version, loadAverage: os.loadavg() },
    seconds,
    members: { requests: latencies.length, requestsPerSecond: Math.round(latencies.length / elapsed), latencyMs: { p50: percentile(latencies, 50), p95: percentile(latencies, 95), p99: percentile(latencies, 99) }, errors, statuses },
    planners: { requests: plannerLatency.length * 2, edits: plannerLatency.length, fitsStarted: fits, latencyMsPerEditAndRead: { p50: percentile(plannerLatency, 50), p95: percentile(plannerLatency, 95), p99: percentile(plannerLatency, 99) }, errors: plannerErrors },
  };
  fs.mkdirSync('bench/results', { recursive: true });
  fs.writeFileSync('bench/results/server-mode.json', JSON.stringify(report, null, 2) + '\n');
  console.log(JSON.stringify(report, null, 2));
} finally {
  await db.end().catch(() => {});
  for (const s of servers) await s.stop();
  await admin.query(`drop database if exists ${name} with (force)`);
  await admin.end();
}
