/** What every benchmark script shares: the repository root, rounding, the machine yardstick and timed runs. */
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { generateNqPanel, SyntheticItem } from '../server/estimation/index.js';

export const root = join(dirname(fileURLToPath(import.meta.url)), '..');

export const round = (v: number, d = 1): number => Math.round(v * 10 ** d) / 10 ** d;

export const median = (xs: number[]): number => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

/**
 * A fixed yardstick for the machine's state, written beside every figure: 30 million streaming
 * multiply-adds on Float64Array, in CPU ms (about 100 ms on an idle machine here).
 */
export const yardstick = (): number => {
  const a = new Float64Array(10000).map((_, i) => i * 1e-4);
  const b = new Float64Array(10000).fill(0.5);
  const o = new Float64Array(10000);
  const c0 = process.cpuUsage();
  for (let k = 0; k < 3000; k++) for (let s = 0; s < 10000; s++) o[s]! += a[s]! * 1.5 + b[s]!;
  const c = process.cpuUsage(c0);
  return round((c.user + c.system) / 1000);
};

/** Runs `f` `runs` times; the wall-clock and CPU milliseconds of each run. */
export const timeRuns = (runs: number, f: () => void): { wall: number[]; cpu: number[] } => {
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    f();
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return { wall, cpu };
};

/** The six invented items of the benchmark panel (2 outputs, 4 inputs with the numeraire). */
export const BENCH_ITEMS: SyntheticItem[] = [
  { name: 'wheat', role: 'output', price: 250, quantity: 1500, ownElasticity: 0.4, trendShare: 0.01 },
  { name: 'canola', role: 'output', price: 520, quantity: 400, ownElasticity: 0.6, trendShare: 0.015 },
  { name: 'nitrogen', role: 'input', price: 120, quantity: 600, ownElasticity: -0.5, trendShare: 0.005 },
  { name: 'phosphate', role: 'input', price: 90, quantity: 250, ownElasticity: -0.4 },
  { name: 'diesel', role: 'input', price: 110, quantity: 400, ownElasticity: -0.3, trendShare: -0.005 },
  { name: 'other', role: 'input', price: 100, quantity: 2000 },
];

/** The benchmark panel's settings: 500 invented farms × 20 seasons from 2005, fixed seed. */
export const benchPanel = (): Parameters<typeof generateNqPanel>[0] => ({
  items: BENCH_ITEMS,
  farms: 500,
  seasons: 20,
  firstSeason: 2005,
  seed: 777,
  rho: 0.12,
});
