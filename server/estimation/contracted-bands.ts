/**
 * Contracted deliveries: the bands (docs/cost-duality.md §6). Each draw's solution gives a farm's
 * figures (FarmFigures; the point goes through the same arithmetic), the co-op's figures are sums
 * over farms within the draw (CoopSums), and each figure is summarised over the draws that could be
 * evaluated, its band stretched to the t of its own Welch–Satterthwaite degrees of freedom
 * (farmStretches).
 */
import type { ContractedBand } from '../../shared/contracted-types.js';
import { costAndSpending, type SolveSuccess } from './contracted-core.js';
import type { FarmSetup } from './contracted-setup.js';
import type { Stretch, WelchTable } from './forecast.js';

// A farm's figures and the co-op's sums

/** A farm's items by part: committed (by item), inputs and free outputs (item indices). */
export interface ItemSets {
  roles: readonly ('output' | 'input')[];
  isCommitted: boolean[];
  inputIdx: number[];
  freeIdx: number[];
}

/**
 * What one solution says for a farm, in levels, in slots (one per draw, or one for the point): the
 * committed outputs' marginal costs, conditional input use and free outputs (never below zero), the
 * cost and the input spending. Draws and point go through the same arithmetic.
 */
export class FarmFigures {
  readonly mc: Float64Array[];
  readonly inputs: Float64Array[];
  readonly free: Float64Array[];
  readonly cost: Float64Array;
  readonly spend: Float64Array;

  constructor(
    readonly farm: FarmSetup,
    readonly sets: ItemSets,
    slots: number,
  ) {
    this.mc = farm.committed.map(() => new Float64Array(slots));
    this.inputs = sets.inputIdx.map(() => new Float64Array(slots));
    this.free = sets.freeIdx.map(() => new Float64Array(slots));
    this.cost = new Float64Array(slots);
    this.spend = new Float64Array(slots);
  }

  /** Slot s from the solution's prices and netputs (per hectare for the per-hectare model). */
  record(s: number, pr: ArrayLike<number>, yr: ArrayLike<number>): void {
    const { farm: f, sets } = this;
    f.committed.forEach((c, j) => (this.mc[j]![s] = pr[c]!));
    sets.inputIdx.forEach((i, j) => (this.inputs[j]![s] = Math.max(0, -f.land * yr[i]!)));
    sets.freeIdx.forEach((i, j) => (this.free[j]![s] = Math.max(0, f.land * yr[i]!)));
    const [cost, spend] = costAndSpending(sets.roles, sets.isCommitted, pr, yr);
    this.cost[s] = f.land * cost;
    this.spend[s] = f.land * spend;
  }
}

/**
 * The co-op's sums over farms, in slots (one per draw, or one for the point), by item: conditional
 * input use, free outputs, and the numerators of the tonnage-weighted marginal cost and margin; and
 * the cost and input spending.
 */
export class CoopSums {
  readonly inputs: Float64Array[];
  readonly free: Float64Array[];
  readonly mcNum: Float64Array[];
  readonly marginNum: Float64Array[];
  readonly cost: Float64Array;
  readonly spend: Float64Array;

  constructor(n: number, slots: number) {
    const perItem = () => Array.from({ length: n }, () => new Float64Array(slots));
    this.inputs = perItem();
    this.free = perItem();
    this.mcNum = perItem();
    this.marginNum = perItem();
    this.cost = new Float64Array(slots);
    this.spend = new Float64Array(slots);
  }

  /** Add slot t of a farm's figures to slot s; contractPrices by committed output (undefined: no margin). */
  add(s: number, fig: FarmFigures, t: number, contractPrices: readonly (number | undefined)[]): void {
    const f = fig.farm;
    const { inputIdx, freeIdx } = fig.sets;
    for (let j = 0; j < inputIdx.length; j++) this.inputs[inputIdx[j]!]![s]! += fig.inputs[j]![t]!;
    for (let j = 0; j < freeIdx.length; j++) this.free[freeIdx[j]!]![s]! += fig.free[j]![t]!;
    this.cost[s]! += fig.cost[t]!;
    this.spend[s]! += fig.spend[t]!;
    f.committed.forEach((c, j) => {
      const mc = fig.mc[j]![t]!;
      this.mcNum[c]![s]! += f.quantity[j]! * mc;
      const cp = contractPrices[j];
      if (cp !== undefined) this.marginNum[c]![s]! += f.quantity[j]! * (cp - mc);
    });
  }
}

// ---------------------------------------------------------------------------------------------
// Summaries and stretches

/**
 * Point and predictive summary over the draws marked ok: deviations of the quantiles from the median
 * stretched by the figure's Welch–Satterthwaite t (as the projection's), the SD by its factor, and
 * the band widened to hold the point.
 */
export function summarise(values: Float64Array, ok: Uint8Array, point: number, probs: number[], level: number, clip: boolean, stretch: Stretch): ContractedBand {
  let N = 0;
  for (let s = 0; s < values.length; s++) if (ok[s]) N++;
  const c = (v: number) => (clip ? Math.max(0, v) : v);
  if (!N) return { point: c(point), mean: c(point), sd: 0, median: c(point), p5: c(point), p95: c(point), lower: c(point), upper: c(point) };
  const sorted = new Float64Array(N);
  for (let s = 0, t = 0; s < values.length; s++) if (ok[s]) sorted[t++] = values[s]!;
  sorted.sort();
  let m = 0;
  for (const v of sorted) m += v;
  m /= N;
  let v2 = 0;
  for (const v of sorted) v2 += (v - m) ** 2;
  const raw = (p: number) => {
    const h = (N - 1) * p;
    const lo = Math.floor(h);
    const hi = Math.min(lo + 1, N - 1);
    return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
  };
  const med = raw(0.5);
  const q = new Map(probs.map((p) => [p, p === 0.5 ? med : med + (raw(p) - med) * stretch.ratio(p)]));
  const lower = Math.min(q.get((1 - level) / 2)!, point);
  const upper = Math.max(q.get((1 + level) / 2)!, point);
  const sd = N > 1 ? Math.sqrt(v2 / (N - 1)) * stretch.sdFactor : 0;
  return { point: c(point), mean: c(m), sd, median: c(med), p5: c(q.get(0.05)!), p95: c(q.get(0.95)!), lower: c(lower), upper: c(upper) };
}

/** x′Vx over the parameters or items (0 without V). */
export function quadForm(V: number[][] | null, x: ArrayLike<number>): number {
  if (!V) return 0;
  let acc = 0;
  for (let a = 0; a < x.length; a++) {
    const xa = x[a]!;
    if (xa === 0) continue;
    const row = V[a]!;
    for (let b = 0; b < x.length; b++) acc += xa * row[b]! * x[b]!;
  }
  return acc;
}

export interface StretchContext {
  sets: ItemSets;
  k: number;
  n: number;
  theta: number[];
  Vf: number[][] | null;
  Vs: number[][] | null;
  Sl: number[][] | null;
  solve: (theta: ArrayLike<number>, shift: ArrayLike<number>) => SolveSuccess | null;
  coop: { Jt: Float64Array[]; Jl: Float64Array[]; noise: Float64Array; marginOf: (c: number) => boolean };
}

/**
 * Welch–Satterthwaite stretches of one farm's figures (docs/cost-duality.md §6). Each figure q is
 * linearised at the point by central differences in the parameters θ and in the shift of every
 * netput (the season shock λ and the farm's own level and residual u enter the same way); then
 *   V_known = J_θ′ V_f J_θ + Σ_i (J_i a_i)²,   V_season = J_θ′ V_s J_θ + J_λ′ Σ_λ J_λ,
 * and the stretch is that of a t with ν* = V² ν / V_season². Rows: the committed outputs' marginal
 * costs, the n netputs (levels), cost, input spending. Adds the farm's parts to the co-op's rows.
 */
export function farmStretches(f: FarmSetup, welch: WelchTable, cx: StretchContext): Stretch[] {
  const { k, n } = cx;
  const m = f.committed.length;
  const R = m + n + 2;
  const figures = (sol: SolveSuccess): number[] => {
    const [cost, spend] = costAndSpending(cx.sets.roles, cx.sets.isCommitted, sol.prices, sol.netputs);
    return [...f.committed.map((c) => sol.prices[c]!), ...sol.netputs.map((y) => f.land * y), f.land * cost, f.land * spend];
  };
  const Jt = Array.from({ length: R }, () => new Float64Array(k));
  const Jl = Array.from({ length: R }, () => new Float64Array(n));
  const th = cx.theta.slice();
  for (let a = 0; a < k; a++) {
    const sd = Math.sqrt(Math.max((cx.Vf?.[a]?.[a] ?? 0) + (cx.Vs?.[a]?.[a] ?? 0), 0));
    if (!(sd > 0)) continue;
    const h = 1e-3 * sd;
    th[a] = cx.theta[a]! + h;
    const up = cx.solve(th, f.mu);
    th[a] = cx.theta[a]! - h;
    const dn = cx.solve(th, f.mu);
    th[a] = cx.theta[a]!;
    if (!up || !dn) continue;
    const fu = figures(up);
    const fd = figures(dn);
    for (let r = 0; r < R; r++) Jt[r]![a] = (fu[r]! - fd[r]!) / (2 * h);
  }
  const shift = f.mu.slice();
  for (let i = 0; i < n; i++) {
    const sd = Math.max(f.noiseSd[i]!, Math.sqrt(Math.max(cx.Sl?.[i]?.[i] ?? 0, 0)));
    if (!(sd > 0)) continue;
    const h = 1e-3 * sd;
    shift[i] = f.mu[i]! + h;
    const up = cx.solve(cx.theta, shift);
    shift[i] = f.mu[i]! - h;
    const dn = cx.solve(cx.theta, shift);
    shift[i] = f.mu[i]!;
    if (!up || !dn) continue;
    const fu = figures(up);
    const fd = figures(dn);
    for (let r = 0; r < R; r++) Jl[r]![i] = (fu[r]! - fd[r]!) / (2 * h);
  }
  const noiseOf = (jl: Float64Array, w: number): number => {
    let acc = 0;
    for (let i = 0; i < n; i++) acc += (w * jl[i]! * f.noiseSd[i]!) ** 2;
    return acc;
  };
  // the co-op's rows
  const addTo = (row: number, r: number, w: number): void => {
    const jt = cx.coop.Jt[row]!;
    const jl = cx.coop.Jl[row]!;
    for (let a = 0; a < k; a++) jt[a]! += w * Jt[r]![a]!;
    for (let i = 0; i < n; i++) jl[i]! += w * Jl[r]![i]!;
    cx.coop.noise[row]! += noiseOf(Jl[r]!, w);
  };
  f.committed.forEach((c, j) => {
    addTo(c, j, f.quantity[j]!);
    if (cx.coop.marginOf(c)) addTo(n + c, j, -f.quantity[j]!);
  });
  for (let i = 0; i < n; i++) addTo(2 * n + i, m + i, 1);
  addTo(3 * n, m + n, 1);
  addTo(3 * n + 1, m + n + 1, 1);
  return Array.from({ length: R }, (_, r) => welch.at(quadForm(cx.Vf, Jt[r]!) + noiseOf(Jl[r]!, 1), quadForm(cx.Vs, Jt[r]!) + quadForm(cx.Sl, Jl[r]!)));
}
