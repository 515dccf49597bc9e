import { afterAll, describe, expect, it } from 'vitest';
import { fitForecastModel } from '../estimation/panel.js';
import { generateForecastPanel, PER_HECTARE_ITEMS } from '../estimation/synthetic-panel.js';
import { WorkerPool } from '../jobs/worker-pool.js';
import { runContractedTask } from './contracted-task.js';

// The contracted-output evaluation off the request thread (docs/cost-duality.md §7): the worker
// gives the same answer as the calling thread, reports progress, and returns bad options as a
// message rather than throwing. Invented data.
const panel = generateForecastPanel({ items: PER_HECTARE_ITEMS, farms: 20, seasons: 6, firstSeason: 2010, seed: 5 });
const model = fitForecastModel(panel.dataset);
const fx = model.farmEffects!;
const farms = fx.farms.slice(0, 12).map((farm, j) => ({ farm, fixed: { land: fx.lastLand[j]! }, contracted: { wheat: 6.4 * fx.lastLand[j]! }, contractPrices: { wheat: 240 } }));
const pool = new WorkerPool(1);
afterAll(() => pool.close());

describe('WorkerPool.runContracted', () => {
  it('answers in a worker thread as in the calling thread, with progress', async () => {
    const shares: number[] = [];
    const inWorker = await pool.runContracted({ model, options: { farms, draws: 200, seed: 3 } }, (s) => shares.push(s));
    const here = runContractedTask({ model, options: { farms, draws: 200, seed: 3 } });
    expect(inWorker.ok).toBe(true);
    expect(inWorker).toEqual(here);
    expect(shares.length).toBeGreaterThan(0);
    if (inWorker.ok) expect(inWorker.result.coop.marginalCost.wheat!.point).toBeGreaterThan(0);
  });

  it('returns unusable options as a message naming the farm and the item', async () => {
    const r = await pool.runContracted({ model, options: { farms: [{ farm: 'F-x', fixed: { land: 10 }, contracted: { nitrogen: 3 } }] } });
    expect(r).toEqual({ ok: false, error: { message: 'farm F-x: nitrogen is an input; only outputs can be committed' } });
  });
});
