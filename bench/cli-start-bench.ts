/**
 * Start-to-finish time of the fit command as a separate process (run on demand; not a test):
 *   npx tsx bench/cli-start-bench.ts
 * The input is a 10,000-observation netput CSV: 500 invented farms × 20 seasons, 6 items, land
 * and a trend, as in bench/estimation-bench.ts. Timed, each a fresh process, as the wall time
 * of the whole process:
 *   - `npm run --silent fit -- --input FILE --trend` (the documented command: npm, then the
 *     bundled JavaScript of scripts/cli.mjs);
 *   - `node scripts/cli.mjs fit ...` (the same without npm's own start);
 *   - the npm command with `--committed wheat=1500,canola=400` (the committed-output section,
 *     1000 draws; docs/fit-command.md §5), for what that option adds;
 *   - `tsx server/estimation/cli.ts ...` (compiling the TypeScript at start, the old way), for
 *     comparison.
 * Also recorded: each process's CPU time (user + system, from /usr/bin/time when present), the
 * machine's load average before and after, and the core count. Target: the npm command well
 * under 1 s. Writes bench/results/cli-start.json.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { BENCH_ITEMS, benchPanel, root, yardstick } from './bench-kit.js';
import { datasetToCsv, generateNqPanel } from '../server/estimation/index.js';

const work = mkdtempSync(join(tmpdir(), 'netput-cli-bench-'));
const { dataset } = generateNqPanel(benchPanel());
const csvPath = join(work, 'bench-10000.csv');
writeFileSync(csvPath, datasetToCsv(dataset));
const args = ['--input', csvPath, '--trend'];
const gnuTime = existsSync('/usr/bin/time');

interface Run {
  wallMs: number;
  cpuMs: number | null;
}

function runOnce(cmd: string, argv: string[]): Run {
  const t0 = performance.now();
  const r = gnuTime
    ? spawnSync('/usr/bin/time', ['-f', '%U %S', cmd, ...argv], { cwd: root, encoding: 'utf8', maxBuffer: 64 << 20 })
    : spawnSync(cmd, argv, { cwd: root, encoding: 'utf8', maxBuffer: 64 << 20 });
  const wallMs = performance.now() - t0;
  if (r.status !== 0) throw new Error(`${cmd} ${argv.join(' ')} failed: ${r.stderr}`);
  JSON.parse(r.stdout); // the contract's one JSON document
  let cpuMs: number | null = null;
  if (gnuTime) {
    const last = r.stderr.trim().split('\n').at(-1)!.split(' ').map(Number);
    cpuMs = Math.round((last[0]! + last[1]!) * 1000);
  }
  return { wallMs: Math.round(wallMs), cpuMs };
}

function series(label: string, cmd: string, argv: string[], runs: number): Record<string, unknown> {
  runOnce(cmd, argv); // warm: the bundle is built on a first run, and the file cache is filled
  const xs = Array.from({ length: runs }, () => runOnce(cmd, argv));
  const wall = xs.map((x) => x.wallMs).sort((a, b) => a - b);
  const cpu = xs.map((x) => x.cpuMs).filter((v): v is number => v !== null).sort((a, b) => a - b);
  const out = {
    command: label,
    runs,
    wallMs: { min: wall[0], median: wall[Math.floor(runs / 2)], max: wall.at(-1) },
    cpuMs: cpu.length ? { min: cpu[0], median: cpu[Math.floor(cpu.length / 2)] } : null,
  };
  console.log(`${label}: wall median ${out.wallMs.median} ms (min ${out.wallMs.min}), CPU median ${out.cpuMs?.median ?? '?'} ms`);
  return out;
}


const loadStart = loadavg();
const yardStart = yardstick();
const results = [
  series('npm run --silent fit -- --input FILE --trend', 'npm', ['run', '--silent', 'fit', '--', ...args], 7),
  series('node scripts/cli.mjs fit --input FILE --trend', process.execPath, [join(root, 'scripts', 'cli.mjs'), 'fit', ...args], 7),
  series(
    'npm run --silent fit -- --input FILE --trend --committed wheat=1500,canola=400 (committed outputs, 1000 draws)',
    'npm',
    ['run', '--silent', 'fit', '--', ...args, '--committed', 'wheat=1500,canola=400'],
    5,
  ),
  series('tsx server/estimation/cli.ts --input FILE --trend (old start, for comparison)', join(root, 'node_modules', '.bin', 'tsx'), [join(root, 'server', 'estimation', 'cli.ts'), ...args], 3),
];
const loadEnd = loadavg();
const yardEnd = yardstick();
rmSync(work, { recursive: true, force: true });
const doc = {
  measuredAt: new Date().toISOString(),
  machine: { cpus: cpus().length, model: cpus()[0]?.model ?? '', node: process.version, loadAverageStart: loadStart.map((v) => Math.round(v * 100) / 100), loadAverageEnd: loadEnd.map((v) => Math.round(v * 100) / 100), yardstickCpuMs: { start: yardStart, end: yardEnd, what: '30 million streaming multiply-adds on Float64Array (about 100 ms on an idle machine here)' } },
  input: { observations: dataset.rows.length, items: BENCH_ITEMS.length, fixed: ['land'], trend: true },
  targetMs: 1000,
  note: 'Wall time of the whole process, each run a fresh process. Under a high load average the wall time is dominated by waiting for a CPU; the CPU time is the steadier figure.',
  results,
};
writeFileSync(join(root, 'bench', 'results', 'cli-start.json'), JSON.stringify(doc, null, 2) + '\n');
console.log('wrote bench/results/cli-start.json');
