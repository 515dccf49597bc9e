/**
 * Responsiveness benchmark (run on demand; not a test): `npm run bench:responsiveness`.
 * Starts the real server (`tsx server/main.ts`) on a fresh temporary data folder holding the demo
 * co-op and measures how long `/api/health` takes to answer, probed every 20 ms from this process,
 *   A. while a 200,000-row price import commits (upload and check first, then POST …/commit until
 *      the import is `committed`), and
 *   B. while five clients read the largest table whole at once: the price table, then holding the
 *      import's rows and a second, unmeasured import of 38,000 more (238,320 prices), each client
 *      downloading it as a streamed CSV export (GET /api/prices/export), the one way to get the
 *      whole table since GET /api/prices answers windows of at most 1,000 rows;
 *   C. while five clients scroll the prices grid as its infinite row model does: 30 windows of 100
 *      rows each at offsets across the table, sorted by price, by item or in the table order, some
 *      narrowed by a text condition (GET /api/prices?offset=…&limit=100&sort=…).
 * Target (issue 15 item 10): p99 under 200 ms in each. Writes bench/results/responsiveness.json and
 * .md with the machine's load (os.loadavg) before and after.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { DateTime } from 'luxon';
import { buildDemoCoop } from '../seed/demo-coop.js';
import { HttpSession, startServerProcess } from '../tests/integration/server-process.js';

const ROWS = Number(process.env.BENCH_ROWS ?? 200_000);
/** Rows of the second import, so the price table reaches the largest size reported (238,000 imported prices). */
const MORE_ROWS = Number(process.env.BENCH_MORE_ROWS ?? 38_000);
const READERS = 5;
const WINDOWS = 30;
const PROBE_MS = 20;
const root = path.join(path.dirname(fileURLToPath(import.meta.url)), '..');
const load = () => os.loadavg().map((x) => Math.round(x * 100) / 100);

/** Invented prices for the demo co-op's items at every delivery point, one a day, near each item's demo level. */
function priceCsv(rows: number, skip = 0): Buffer {
  const demo = buildDemoCoop();
  const level = new Map<string, number>();
  for (const p of demo.prices) level.set(p.item, p.price);
  const lines = ['item,season,delivery_point,price,currency,source,observed_on'];
  outer: for (let day = 0; day < 800; day++) {
    for (const s of demo.seasons) {
      const date = DateTime.utc(s.startYear, 7, 1).plus({ days: day }).toISODate();
      for (const it of demo.items) {
        for (const dp of demo.deliveryPoints) {
          if (lines.length > rows + skip) break outer;
          const base = level.get(it.code) ?? 100;
          lines.push(`${it.code},${s.label},${dp.name},${(base * (0.9 + ((day * 7 + lines.length) % 20) / 100)).toFixed(3)},EUR,Bench daily quote,${date}`);
        }
      }
    }
  }
  return Buffer.from(`${[lines[0], ...lines.slice(1 + skip)].join('\n')}\n`);
}

interface Figures {
  samples: number;
  p50: number;
  p95: number;
  p99: number;
  max: number;
  failures: number;
  durationMs: number;
}

function figures(ms: number[], failures: number, durationMs: number): Figures {
  const s = [...ms].sort((a, b) => a - b);
  const q = (p: number) => (s.length ? s[Math.min(s.length - 1, Math.ceil(p * s.length) - 1)] : NaN);
  const r = (x: number) => Math.round(x * 10) / 10;
  return { samples: s.length, p50: r(q(0.5)), p95: r(q(0.95)), p99: r(q(0.99)), max: r(s[s.length - 1] ?? NaN), failures, durationMs: Math.round(durationMs) };
}

/** Probes /api/health every PROBE_MS until `work` settles; one request at a time, timed from send to answer. */
async function probeDuring(url: string, work: () => Promise<unknown>): Promise<Figures> {
  const latencies: number[] = [];
  let failures = 0;
  let done = false;
  const started = performance.now();
  const probe = (async () => {
    while (!done) {
      const t0 = performance.now();
      try {
        const res = await fetch(`${url}/api/health`);
        await res.arrayBuffer();
        if (res.ok) latencies.push(performance.now() - t0);
        else failures++;
      } catch {
        failures++;
      }
      const wait = PROBE_MS - (performance.now() - t0);
      if (wait > 0) await new Promise((r) => setTimeout(r, wait));
    }
  })();
  try {
    await work();
  } finally {
    done = true;
    await probe;
  }
  return figures(latencies, failures, performance.now() - started);
}

/**
 * Runs a request again when the network failed before any answer: the server closes keep-alive
 * connections idle for 5 s, and a request sent on one just as it closes fails with EPIPE/ECONNRESET.
 */
async function retried<T>(send: () => Promise<T>): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await send();
    } catch (err) {
      if (attempt >= 4 || !(err instanceof TypeError)) throw err;
      await new Promise((r) => setTimeout(r, 200));
    }
  }
}

async function main() {
  const loadBefore = load();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'netput-responsiveness-'));
  const server = await startServerProcess({ DATA_DIR: dataDir, LOG_LEVEL: 'error' }, 300_000);
  serverOutput = server.output;
  try {
    const planner = new HttpSession(server.url);
    const login = await planner.request('POST', '/api/auth/login', { email: 'planner@example.org', password: 'netput-demo' });
    if (login.status !== 200) throw new Error(`sign-in failed: ${login.status}`);
    const file = priceCsv(ROWS);
    const staged = await retried(() => planner.upload('/api/imports', { kind: 'prices' }, { name: 'bench-prices.csv', bytes: file }));
    if (staged.status !== 201 || staged.body.errorCount) throw new Error(`upload failed: ${staged.status} ${JSON.stringify(staged.body).slice(0, 500)}`);
    const id = staged.body.id as number;

    let commitMs = 0;
    const duringCommit = await probeDuring(server.url, async () => {
      const t0 = performance.now();
      const started = await retried(() => planner.request('POST', `/api/imports/${id}/commit`, { onExisting: 'skip', acceptWarnings: true }));
      if (started.status !== 202) throw new Error(`commit refused: ${started.status} ${JSON.stringify(started.body)}`);
      for (;;) {
        const res = await retried(() => planner.request('GET', `/api/imports/${id}`));
        if (res.body.status === 'committed') break;
        if (res.body.status !== 'committing') throw new Error(`commit ended ${res.body.status}: ${res.body.failure}`);
        await new Promise((r) => setTimeout(r, 100));
      }
      commitMs = performance.now() - t0;
    });

    // The second import (not measured) brings the table to its largest size.
    const moreFile = priceCsv(MORE_ROWS, ROWS);
    const more = await retried(() => planner.upload('/api/imports', { kind: 'prices' }, { name: 'bench-more-prices.csv', bytes: moreFile }));
    if (more.status !== 201 || more.body.errorCount) throw new Error(`second upload failed: ${more.status} ${JSON.stringify(more.body).slice(0, 500)}`);
    const moreStarted = await retried(() => planner.request('POST', `/api/imports/${more.body.id}/commit`, { onExisting: 'skip', acceptWarnings: true }));
    if (moreStarted.status !== 202) throw new Error(`second commit refused: ${moreStarted.status}`);
    for (let resets = 0; ; ) {
      // A reused keep-alive connection may be reset between polls; ask again on a fresh one.
      const res = await planner.request('GET', `/api/imports/${more.body.id}`).catch((err) => {
        if (++resets > 5) throw err;
        return { status: 0, body: { status: 'committing' } } as Awaited<ReturnType<typeof planner.request>>;
      });
      if (res.body.status === 'committed') break;
      if (res.body.status !== 'committing') throw new Error(`second commit ended ${res.body.status}: ${res.body.failure}`);
      await new Promise((r) => setTimeout(r, 200));
    }

    const readers = Array.from({ length: READERS }, () => planner.at(server.url));
    const head = await fetch(`${server.url}/api/prices?limit=1`, { headers: { cookie: readers[0].cookieHeader() } });
    const tableRows = Number(head.headers.get('x-total-count'));
    let exportBytes = 0;
    let exportLines = 0;
    let readsMs = 0;
    const duringReads = await probeDuring(server.url, async () => {
      const t0 = performance.now();
      await Promise.all(
        readers.map(async (r) => {
          const res = await fetch(`${server.url}/api/prices/export?format=csv`, { headers: { cookie: r.cookieHeader() } });
          if (!res.ok) throw new Error(`GET /api/prices/export answered ${res.status}`);
          const text = Buffer.from(await res.arrayBuffer()).toString('utf8');
          exportBytes = Buffer.byteLength(text);
          exportLines = text.split('\r\n').filter((l) => l !== '').length - 1;
        }),
      );
      readsMs = performance.now() - t0;
    });
    if (exportLines !== tableRows) throw new Error(`an export held ${exportLines} rows, the table ${tableRows}`);

    const orders = ['', '&sort=price&dir=desc', '&sort=itemId', '&sort=observedOn&dir=desc', '&sort=seasonId&source=contains:daily'];
    let windowsMs = 0;
    let windowRows = 0;
    const duringPages = await probeDuring(server.url, async () => {
      const t0 = performance.now();
      await Promise.all(
        readers.map(async (r, k) => {
          for (let w = 0; w < WINDOWS; w++) {
            const offset = Math.floor((((w * 7919 + k * 104729) % WINDOWS) / WINDOWS) * (tableRows - 100));
            const res = await fetch(`${server.url}/api/prices?offset=${offset}&limit=100${orders[(w + k) % orders.length]}&r=${k}-${w}`, { headers: { cookie: r.cookieHeader() } });
            if (!res.ok) throw new Error(`GET /api/prices answered ${res.status}`);
            windowRows += ((await res.json()) as unknown[]).length;
          }
        }),
      );
      windowsMs = performance.now() - t0;
    });

    const result = {
      date: new Date().toISOString(),
      node: process.version,
      cpus: os.cpus().length,
      loadBefore,
      loadAfter: load(),
      target: 'GET /api/health p99 < 200 ms',
      importRows: ROWS,
      commitMs: Math.round(commitMs),
      healthDuringCommit: duringCommit,
      readers: READERS,
      priceTableRows: tableRows,
      bytesPerExport: exportBytes,
      fiveExportsMs: Math.round(readsMs),
      healthDuringExports: duringReads,
      windowsPerReader: WINDOWS,
      windowRowsRead: windowRows,
      windowsMs: Math.round(windowsMs),
      healthDuringWindows: duringPages,
    };
    fs.mkdirSync(path.join(root, 'bench/results'), { recursive: true });
    fs.writeFileSync(path.join(root, 'bench/results/responsiveness.json'), `${JSON.stringify(result, null, 2)}\n`);
    const row = (name: string, f: Figures) => `| ${name} | ${f.samples} | ${f.p50} | ${f.p95} | ${f.p99} | ${f.max} | ${f.failures} | ${f.p99 < 200 ? 'met' : 'NOT met'} |`;
    const md = [
      '# /api/health during big work',
      '',
      `${result.date}, Node ${result.node}, ${result.cpus} CPUs, load average ${loadBefore.join(' / ')} before and ${result.loadAfter.join(' / ')} after (1 / 5 / 15 min).`,
      '',
      `Import of ${ROWS.toLocaleString('en-GB')} price rows committed in ${(commitMs / 1000).toFixed(1)} s. Whole-table reads: ${READERS} clients at once each downloading the price table (${tableRows.toLocaleString('en-GB')} rows) as a streamed CSV export (${(exportBytes / 1e6).toFixed(1)} MB each), all done in ${(readsMs / 1000).toFixed(1)} s. Grid windows: ${READERS} clients × ${WINDOWS} windows of 100 rows (GET /api/prices with offset, sort and a text condition), done in ${(windowsMs / 1000).toFixed(1)} s.`,
      '',
      '| during | probes | p50 ms | p95 ms | p99 ms | max ms | failed | p99 < 200 ms |',
      '|---|---|---|---|---|---|---|---|',
      row('200,000-row import commit', duringCommit),
      row(`${READERS} concurrent whole-table exports`, duringReads),
      row(`${READERS} clients scrolling grid windows`, duringPages),
      '',
    ].join('\n');
    fs.writeFileSync(path.join(root, 'bench/results/responsiveness.md'), md);
    console.log(md);
  } finally {
    await server.stop();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

let serverOutput: () => string = () => '';

main().catch((err) => {
  console.error(serverOutput().slice(-4000));
  console.error(err);
  process.exit(1);
});
