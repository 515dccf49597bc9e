/**
 * Speed of the contracted-output evaluation (run on demand; not a test):
 *   npm run bench:contracted
 * On an invented per-hectare panel (the forecasting model with farm and season effects, 5 items),
 * evaluateContracted for 100 and for 1,000 farms that each commit wheat, and half of them canola
 * too, with 2,000 draws (the API's default): the normalized quadratic's linear solve in every draw,
 * the Welch–Satterthwaite sensitivities per farm, the co-op sums. Also the generalized Leontief
 * model (the general Newton solve in every draw) for 100 farms. Target: 100 farms well under 2 s
 * (an outlook's contracted view runs it in a worker thread, with progress).
 * Writes bench/results/contracted.json with the machine's load average and a fixed CPU yardstick,
 * so figures from a busy machine can be read for what they are.
 */
import { writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { join } from 'node:path';
import { median, round, root, timeRuns, yardstick } from './bench-kit.js';
import { evaluateContracted, fitForecastModel, generateForecastPanel, PER_HECTARE_ITEMS, type ForecastModel } from '../server/estimation/index.js';

const measure = (runs: number, f: () => void) => {
  const { wall, cpu } = timeRuns(runs, f);
  return { wallMedianMs: round(median(wall)), wallMinMs: round(Math.min(...wall)), cpuMedianMs: round(median(cpu)), runs };
};

const loadStart = loadavg();
const yardStart = yardstick();
const panel = generateForecastPanel({ items: PER_HECTARE_ITEMS, farms: 1000, seasons: 10, firstSeason: 2010, seed: 21 });
const nq = fitForecastModel(panel.dataset);
const gl = fitForecastModel(panel.dataset, { form: 'gl' });
const farmsOf = (model: ForecastModel, F: number) =>
  model.farmEffects!.farms.slice(0, F).map((farm, j) => {
    const L = model.farmEffects!.lastLand[j]!;
    const contracted: Record<string, number> = j % 2 === 0 ? { wheat: 6.2 * L, canola: 1.5 * L } : { wheat: 6.4 * L };
    return { farm, fixed: { land: L }, contracted, contractPrices: { wheat: 240 } };
  });
const prices = { wheat: 250, canola: 520, nitrogen: 1200, diesel: 1.1, other: 100 };
const cases = [
  { label: 'normalized quadratic, 100 farms, 2000 draws', model: nq, farms: 100, runs: 3 },
  { label: 'normalized quadratic, 1000 farms, 2000 draws', model: nq, farms: 1000, runs: 1 },
  { label: 'generalized Leontief (Newton in every draw), 100 farms, 2000 draws', model: gl, farms: 100, runs: 1 },
];
const results = cases.map((c) => {
  const farms = farmsOf(c.model, c.farms);
  const r = measure(c.runs, () => void evaluateContracted(c.model, { farms, prices, draws: 2000, seed: 1 }));
  console.log(`${c.label}: wall median ${r.wallMedianMs} ms, CPU median ${r.cpuMedianMs} ms`);
  return { case: c.label, ...r };
});
const doc = {
  measuredAt: new Date().toISOString(),
  machine: {
    cpus: cpus().length,
    model: cpus()[0]?.model ?? '',
    node: process.version,
    loadAverageStart: loadStart.map((v) => round(v, 2)),
    loadAverageEnd: loadavg().map((v) => round(v, 2)),
    yardstickCpuMs: { start: yardStart, end: yardstick(), what: '30 million streaming multiply-adds on Float64Array (about 100 ms on an idle machine here)' },
  },
  target: '100 farms well under 2 s',
  note: 'One thread; the server runs it in a worker (WorkerPool.runContracted). Under a high load average the wall time is mostly waiting for a CPU; the CPU time is the steadier figure.',
  results,
};
writeFileSync(join(root, 'bench', 'results', 'contracted.json'), JSON.stringify(doc, null, 2) + '\n');
console.log('wrote bench/results/contracted.json');
