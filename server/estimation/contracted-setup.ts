/**
 * Contracted deliveries: each farm's set-up, checked (docs/cost-duality.md). Unusable options — an
 * unknown item or factor, a committed input, a quantity or price that is not a usable number — throw
 * EstimationInputError naming the farm and the item. Fixed factors are taken per hectare for the
 * per-hectare model; each farm gets its own level and the SD of its own level and residual.
 */
import type { ContractedFarmSpec } from '../../shared/contracted-types.js';
import type { ContractedOptions } from './contracted.js';
import { EstimationInputError } from './errors.js';
import type { ForecastModel } from './panel.js';

/** One farm of the evaluation, checked and in the model's terms. */
export interface FarmSetup {
  spec: ContractedFarmSpec;
  prices: number[];
  /** Fixed factors as the profit function takes them (per hectare for the per-hectare model, trend included). */
  z: number[];
  land: number;
  known: boolean;
  /** Own level μ_f per item (0 for the pooled model or a new farm). */
  mu: number[];
  /** Standard deviation of the farm-level shift per item (own-level uncertainty + residual). */
  noiseSd: number[];
  committed: number[];
  /** Committed quantities in levels and per hectare (per farm for the pooled model). */
  quantity: number[];
  target: number[];
}

/** The farm's recorded quantities of one item: least, most, and how many seasons. */
export interface FarmHistory {
  min: number;
  max: number;
  seasons: number;
}

export function setUp(model: ForecastModel, options: ContractedOptions, season: number): FarmSetup[] {
  const { fit } = model;
  const { layout } = fit;
  const n = layout.items.length;
  const perHa = model.spec === 'per-hectare';
  const itemIndex = new Map(layout.items.map((it, i) => [it.name, i]));
  const trendIdx = layout.trendOrigin !== null ? layout.factors.indexOf('trend') : -1;
  const common = fit.means.prices.slice();
  for (const [name, v] of Object.entries(options.prices ?? {})) {
    const i = itemIndex.get(name);
    if (i === undefined) throw new EstimationInputError(`prices: "${name}" is not an item of the model (items: ${[...itemIndex.keys()].join(', ')})`);
    if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`prices: the price of ${name} must be a positive number, got ${v}`);
    common[i] = v;
  }
  const landName = model.landFactor;
  const fx = model.farmEffects;
  const farmPos = new Map((fx?.farms ?? []).map((f, i) => [f, i]));
  const scale = model.errorScale;
  const seen = new Set<string>();
  return options.farms.map((spec) => {
    const where = `farm ${spec.farm}`;
    if (typeof spec.farm !== 'string' || !spec.farm) throw new EstimationInputError('every farm needs a name');
    if (seen.has(spec.farm)) throw new EstimationInputError(`${where} is listed twice`);
    seen.add(spec.farm);
    const prices = common.slice();
    for (const [name, v] of Object.entries(spec.prices ?? {})) {
      const i = itemIndex.get(name);
      if (i === undefined) throw new EstimationInputError(`${where}: "${name}" is not an item of the model`);
      if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`${where}: the price of ${name} must be a positive number, got ${v}`);
      prices[i] = v;
    }
    const fixed = spec.fixed ?? {};
    for (const name of Object.keys(fixed))
      if (name !== landName && !layout.factors.includes(name)) throw new EstimationInputError(`${where}: "${name}" is not a fixed factor of the model`);
    let land = 1;
    if (perHa) {
      const L = fixed[landName!];
      if (L === undefined || !(Number.isFinite(L) && L > 0)) throw new EstimationInputError(`${where}: land (${landName}) must be given and more than 0 ha`);
      land = L;
    }
    const z = layout.factors.map((name, kk) => {
      if (kk === trendIdx && fixed[name] === undefined) return season - layout.trendOrigin! + 1;
      const v = fixed[name];
      if (v === undefined || !Number.isFinite(v)) throw new EstimationInputError(`${where}: fixed factor "${name}" is missing or not a number`);
      return perHa && kk !== trendIdx ? v / land : v;
    });
    const committed: number[] = [];
    const quantity: number[] = [];
    const entries = Object.entries(spec.contracted ?? {});
    for (const [name, q] of entries) {
      const i = itemIndex.get(name);
      if (i === undefined) throw new EstimationInputError(`${where}: committed item "${name}" is not an item of the model`);
      if (layout.items[i]!.role !== 'output') throw new EstimationInputError(`${where}: ${name} is an input; only outputs can be committed`);
      if (!(Number.isFinite(q) && q > 0)) throw new EstimationInputError(`${where}: the committed quantity of ${name} must be a number above 0, got ${q}`);
      committed.push(i);
      quantity.push(q);
    }
    // item order
    const order = committed.map((_, j) => j).sort((a, b) => committed[a]! - committed[b]!);
    const c = order.map((j) => committed[j]!);
    const qs = order.map((j) => quantity[j]!);
    for (const [name, v] of Object.entries(spec.contractPrices ?? {})) {
      if (!(spec.contracted ?? {})[name]) throw new EstimationInputError(`${where}: a contract price is given for ${name}, which the farm has not committed`);
      if (!(Number.isFinite(v) && v >= 0)) throw new EstimationInputError(`${where}: the contract price of ${name} must be a number of at least 0, got ${v}`);
    }
    for (const [name, v] of Object.entries(spec.history ?? {})) {
      if (!itemIndex.has(name)) throw new EstimationInputError(`${where}: history for "${name}", which is not an item of the model`);
      if (!Array.isArray(v) || v.some((x) => !(Number.isFinite(x) && x >= 0))) throw new EstimationInputError(`${where}: the history of ${name} must be a list of quantities of at least 0`);
    }
    const pos = farmPos.get(spec.farm);
    const mu = new Array<number>(n).fill(0);
    const noiseSd = new Array<number>(n).fill(0);
    for (let i = 0; i < n; i++) {
      let varFarm = 0;
      if (perHa && fx) {
        if (pos !== undefined) {
          mu[i] = fx.effects[i]![pos]!;
          varFarm = fx.variance[i]![pos]!;
        } else varFarm = fx.tau2[i]!;
      }
      const resVar = perHa && scale ? scale.variance[i]! * Math.exp(scale.exponent[i]! * Math.log(land / scale.referenceLand)) : fit.sigma[i]![i]!;
      noiseSd[i] = Math.sqrt(Math.max(varFarm + resVar, 0));
    }
    return { spec, prices, z, land, known: pos !== undefined, mu, noiseSd, committed: c, quantity: qs, target: qs.map((q) => q / land) };
  });
}

export function historyOf(spec: ContractedFarmSpec, item: string): FarmHistory | null {
  const h = spec.history?.[item];
  if (!h || !h.length) return null;
  return { min: Math.min(...h), max: Math.max(...h), seasons: h.length };
}
