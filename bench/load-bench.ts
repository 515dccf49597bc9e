/**
 * Load benchmark (loopback only, bounded in time): autocannon at 100 connections against the read
 * endpoints of a real server while two fits run in the background. Writes bench/results/load.json.
 *
 *   npm run bench:load [-- --seconds 15 --connections 100]
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import { HttpSession, startServerProcess } from '../tests/integration/server-process.js';
import { demoModel } from '../seed/demo-model.js';

const arg = (name: string, fallback: number) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : fallback;
};
const seconds = arg('seconds', 15);
const connections = arg('connections', 100);

function percentile(sorted: number[], p: number) {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];
}

const loadAtStart = os.loadavg().map((x) => Math.round(x * 100) / 100);
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-bench-'));
const server = await startServerProcess({ DATA_DIR: dataDir });
try {
  const planner = new HttpSession(server.url);
  await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' });
  const definition = demoModel({ backtestSeasons: 10 });
  const model = await planner.request('POST', '/api/models', { name: 'Load benchmark model', definition });
  let fitsStarted = 0;
  let fitsFinished = 0;
  let stop = false;
  // Keep two fits running the whole time.
  const keepFitting = async () => {
    while (!stop) {
      const run = await planner.request('POST', `/api/models/${model.body.id}/runs`);
      fitsStarted++;
      for (;;) {
        const s = await planner.request('GET', `/api/model-runs/${run.body.id}/status`);
        if (['succeeded', 'failed', 'cancelled'].includes(s.body.status)) break;
        await new Promise((r) => setTimeout(r, 200));
      }
      fitsFinished++;
    }
  };
  const fitters = [keepFitting(), keepFitting()];
  await new Promise((r) => setTimeout(r, 1500));

  const latencies: number[] = [];
  const statuses: Record<string, number> = {};
  const paths = ['/api/summary', '/api/farms', '/api/prices/series', '/api/items', '/api/models', '/api/auth/me'];
  const instance = autocannon({
    url: server.url,
    connections,
    duration: seconds,
    headers: { cookie: planner.cookieHeader() },
    requests: paths.map((p) => ({ method: 'GET', path: p })),
  });
  instance.on('response', (_client: unknown, statusCode: number, _bytes: number, responseTime: number) => {
    latencies.push(responseTime);
    statuses[statusCode] = (statuses[statusCode] ?? 0) + 1;
  });
  const result = await instance;
  stop = true;
  await Promise.all(fitters);
  latencies.sort((a, b) => a - b);
  const report = {
    benchmark: 'read endpoints at 100 connections while two fits run',
    at: new Date().toISOString(),
    machine: { cpus: os.cpus().length, node: process.version, loadAverageAtStart: loadAtStart, loadAverageAtEnd: os.loadavg().map((x) => Math.round(x * 100) / 100) },
    seconds,
    connections,
    endpoints: paths,
    notes: [
      'PGlite mode (the default): answers of these GET routes are kept in memory until a table they were read from is written (server/core/read-cache.ts), and session lookups likewise; the fits write model_runs (progress, results), so /api/models is read again from the database after each such write.',
      'The fits run in worker threads at nice 10, so they take the CPU the request thread leaves.',
    ],
    requests: latencies.length,
    requestsPerSecond: Math.round(result.requests.average),
    latencyMs: { p50: percentile(latencies, 50), p95: percentile(latencies, 95), p99: percentile(latencies, 99), max: latencies.at(-1) },
    errors: result.errors + result.timeouts + (result.non2xx ?? 0),
    statuses,
    fitsCompletedDuringRun: fitsFinished,
    fitsStarted,
    target: { p95Ms: 100, errors: 0 },
    met: percentile(latencies, 95) < 100 && result.errors + result.timeouts + (result.non2xx ?? 0) === 0,
  };
  fs.mkdirSync('bench/results', { recursive: true });
  fs.writeFileSync('bench/results/load.json', JSON.stringify(report, null, 2) + '\n');
  console.log(JSON.stringify(report, null, 2));
} finally {
  await server.stop();
  fs.rmSync(dataDir, { recursive: true, force: true });
}
