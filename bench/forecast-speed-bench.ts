/**
 * Forecasting engine speed (run on demand; not a test):
 *   npm run bench:forecast-speed
 * 1. Fit: the per-hectare model with farm effects, season effects and size-scaled errors on an
 *    invented panel of 5,000 farms × 20 seasons (100,000 observations, 5 items). Target < 1 s.
 * 2. Projection: 10,000 draws for those 5,000 farms at one price point (their last land).
 *    Target < 2 s.
 * Writes bench/results/forecast-speed.json and .md with the machine's load average and a fixed
 * CPU yardstick, so figures from a busy machine can be read for what they are.
 */
import { writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { join } from 'node:path';
import { median, round, root, timeRuns, yardstick } from './bench-kit.js';
import { fitForecastModel, generateForecastPanel, PER_HECTARE_ITEMS, projectForecast, type ForecastModel } from '../server/estimation/index.js';

const measure = (runs: number, f: () => void) => {
  const { wall, cpu } = timeRuns(runs, f);
  return { wallMedian: round(median(wall)), wallMin: round(Math.min(...wall)), wallMax: round(Math.max(...wall)), cpuMedian: round(median(cpu)), runs };
};

const load0 = loadavg();
const yard0 = yardstick();
const { dataset } = generateForecastPanel({ items: PER_HECTARE_ITEMS, farms: 5000, seasons: 20, firstSeason: 2004, seed: 4242 });
let model: ForecastModel = fitForecastModel(dataset); // warm-up
const fit = measure(5, () => (model = fitForecastModel(dataset)));
const farms = model.farmEffects!.farms.map((farm, j) => ({ farm, fixed: { land: model.farmEffects!.lastLand[j]! } }));
const prices = { wheat: 255, canola: 530, nitrogen: 1180, diesel: 1.15, other: 101 };
projectForecast(model, { farms: farms.slice(0, 500), prices, draws: 2000 }); // warm-up
const proj = measure(5, () => projectForecast(model, { farms, prices, draws: 10000, seed: 1 }));
const load1 = loadavg();
const yard1 = yardstick();

const result = {
  measuredAt: new Date().toISOString(),
  machine: { cores: cpus().length, cpu: cpus()[0]?.model ?? 'unknown', node: process.version },
  loadAverage: { start: load0.map((v) => round(v, 2)), end: load1.map((v) => round(v, 2)) },
  yardstickCpuMs: { start: yard0, end: yard1 },
  fit: { ...fit, targetMs: 1000, observations: dataset.rows.length, farms: 5000, seasons: 20, items: PER_HECTARE_ITEMS.length, outerRounds: model.outerIterations, specification: model.specification },
  projection: { ...proj, targetMs: 2000, draws: 10000, farms: 5000 },
};
writeFileSync(join(root, 'bench', 'results', 'forecast-speed.json'), JSON.stringify(result, null, 2) + '\n');
const row = (what: string, target: string, m: typeof fit) => `| ${what} | ${target} | ${m.wallMedian} ms | ${m.wallMin} ms | ${m.wallMax} ms | ${m.cpuMedian} ms |`;
const md = [
  '# Forecasting engine speed',
  '',
  `Measured ${result.measuredAt} on ${result.machine.cores} cores (${result.machine.cpu}), Node ${result.machine.node};`,
  `load average ${result.loadAverage.start.join(' / ')} at the start, ${result.loadAverage.end.join(' / ')} at the end;`,
  `yardstick (30 million streaming multiply-adds) ${yard0} ms CPU at the start, ${yard1} ms at the end (about 100 ms on an idle machine).`,
  'Run with `npm run bench:forecast-speed`. Wall times over 5 runs after a warm-up, with this process\'s CPU time beside them',
  '(on a shared machine the CPU time is the better guide to an idle machine\'s wall time; it includes the garbage collector\'s threads).',
  '',
  '| what | target | wall median | wall min | wall max | CPU median |',
  '|---|---|---|---|---|---|',
  row(`fit: per-hectare NQ, 5 items, farm + season effects, size-scaled errors, ${result.fit.observations} obs (5,000 farms × 20 seasons), ${model.outerIterations} backfitting rounds`, '< 1 s', fit),
  row('projection: 10,000 draws × 5,000 farms, one price point, farm and co-op bands', '< 2 s', proj),
  '',
].join('\n');
writeFileSync(join(root, 'bench', 'results', 'forecast-speed.md'), md);
console.log(md);
