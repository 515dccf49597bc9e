/**
 * Summaries of Monte Carlo draws without a full sort: mean, SD and the 5/50/95 % quantiles, the
 * quantiles exactly as R's `quantile` type 7 defines them (h = (N − 1)·p, linear interpolation
 * between the order statistics ⌊h⌋ and ⌊h⌋ + 1; docs/forecasting.md §2.2). Only those few order
 * statistics are needed, and three ways find them, each exact where it answers:
 *   - gridOrderStatistics: from a histogram the caller filled while it simulated, on a grid set by
 *     the exact mean and SD of the draws' distribution (the season projection's farm kernel);
 *   - bracketedOrderStatistics: one pass that keeps the values in narrow brackets around
 *     mean + z·sd, where the quantiles of a roughly normal sample fall;
 *   - rangeOrderStatistics: a histogram of equal bins over the sample's range (always answers).
 * Each keeps only the values of the bins (or brackets) that hold the wanted ranks and sorts or
 * selects within them: a few linear passes instead of sorting every draw.
 */
import type { QuantitySummary } from '../../shared/estimation-types.js';

/** The reported quantiles. */
const PROBS = [0.05, 0.5, 0.95];
/** Standard normal 5 % and 95 % points (handbook value) around the mean: where the brackets sit. */
const Z = [-1.6448536269514722, 0, 1.6448536269514722];

/** Ranks (0-based) of the order statistics behind the type-7 5/50/95 % quantiles of N values. */
export function quantileRanks(N: number): number[] {
  const ranks = new Set<number>();
  for (const pr of PROBS) {
    const h = (N - 1) * pr;
    ranks.add(Math.floor(h));
    ranks.add(Math.min(Math.floor(h) + 1, N - 1));
  }
  return [...ranks];
}

/**
 * Mean, SD and the 5/50/95 % quantiles (R's type 7, exact) of a sample. The order statistics come
 * from the bracket search, or where a wanted rank falls outside the brackets from the histogram over
 * the sample's range.
 */
export function summarise(x: Float64Array, point: number): QuantitySummary {
  const N = x.length;
  // One pass: shifted sums (shift x[0] keeps the variance accurate) and the range.
  const c = x[0]!;
  let s1 = 0;
  let s2 = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < N; i++) {
    const v = x[i]!;
    const d = v - c;
    s1 += d;
    s2 += d * d;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const moments = Float64Array.of(c + s1 / N, N > 1 ? Math.sqrt(Math.max(s2 - (s1 * s1) / N, 0) / (N - 1)) : 0, lo, hi);
  return summariseWithMoments(x, point, moments);
}

/**
 * summarise() given [mean, sd, min, max] already computed (min and max may be ∓Infinity: not
 * tracked, found here when needed), and optionally the order statistics by rank (`known`, e.g. from
 * gridOrderStatistics).
 */
export function summariseWithMoments(x: Float64Array, point: number, moments: Float64Array, known: Map<number, number> | null = null): QuantitySummary {
  const N = x.length;
  const [mean, sd, lo, hi] = [moments[0]!, moments[1]!, moments[2]!, moments[3]!];
  if (!(hi > lo) || sd === 0) {
    const v = Number.isFinite(lo) ? lo : x[0]!;
    if (sd === 0 || !Number.isFinite(lo)) {
      // sd is exactly 0 only when every value is equal (the shifted sums vanish)
      let same = true;
      for (let i = 1; i < N && same; i++) same = x[i] === x[0];
      if (same) return { point, mean, sd, median: x[0]!, p5: x[0]!, p95: x[0]! };
    } else return { point, mean, sd, median: v, p5: v, p95: v };
  }
  const ranks = quantileRanks(N);
  const range = (): [number, number] => {
    if (Number.isFinite(lo) && Number.isFinite(hi)) return [lo, hi];
    let a = Infinity;
    let b = -Infinity;
    for (let i = 0; i < N; i++) {
      if (x[i]! < a) a = x[i]!;
      if (x[i]! > b) b = x[i]!;
    }
    return [a, b];
  };
  const order = known ?? bracketedOrderStatistics(x, ranks, mean, sd) ?? rangeOrderStatistics(x, ranks, ...range());
  const q = (pr: number): number => {
    const h = (N - 1) * pr;
    const k = Math.floor(h);
    const a = order.get(k)!;
    const b = order.get(Math.min(k + 1, N - 1))!;
    return a + (h - k) * (b - a);
  };
  return { point, mean, sd, median: q(0.5), p5: q(0.05), p95: q(0.95) };
}

// ---------------------------------------------------------------------------------------------
// The grid histogram: filled by the caller while it simulates

/** Bins of the grid: GRID_BINS of sd/64 over mean ± 8 sd, plus one end bin on each side (0 and GRID_BINS + 1). */
export const GRID_BINS = 1024;

/** A histogram on the grid mean ± 8 sd (counts are shared scratch: one grid in use at a time). */
export interface DrawGrid {
  lo: number;
  /** Bins per unit of the value (0 when sd is 0: every value counts in bin 1, and the grid answers nothing). */
  scale: number;
  counts: Int32Array;
}

const gridScratch = { counts: new Int32Array(GRID_BINS + 2), slot: new Int32Array(GRID_BINS + 2).fill(-1), start: new Int32Array(GRID_BINS + 3) };

/** An empty grid for draws of (exact or expected) mean and SD; count a value v in bin gridBin(v, grid.lo, grid.scale). */
export function drawGrid(mean: number, sd: number): DrawGrid {
  const counts = gridScratch.counts;
  counts.fill(0);
  return { lo: mean - 8 * sd, scale: sd > 0 ? GRID_BINS / (16 * sd) : 0, counts };
}

/** The grid bin of a value: 0 below the grid, GRID_BINS + 1 above it. */
export function gridBin(v: number, lo: number, scale: number): number {
  const b = ((v - lo) * scale + 1) | 0;
  return b < 0 ? 0 : b > GRID_BINS + 1 ? GRID_BINS + 1 : b;
}

/**
 * The order statistics of x at the given ranks from its filled grid: a second, cheap pass keeps the
 * values of the few bins that hold the ranks, and selection inside them gives the exact values.
 * Returns them by rank, or null when a rank falls in an end bin (outside the grid) or the grid has
 * no width.
 */
export function gridOrderStatistics(x: Float64Array, grid: DrawGrid, ranks: number[]): Map<number, number> | null {
  const { lo, scale, counts } = grid;
  if (!(scale > 0)) return null;
  const S = x.length;
  const start = gridScratch.start;
  const rankBins = binsOfRanks(counts, GRID_BINS + 2, ranks, start);
  if (rankBins.some((b) => b === 0 || b === GRID_BINS + 1)) return null;
  const slot = gridScratch.slot;
  const { lists, fill } = listsForBins(rankBins, counts, slot);
  for (let s = 0; s < S; s++) {
    const v = x[s]!;
    const k = slot[gridBin(v, lo, scale)]!;
    if (k >= 0) lists[k]![fill[k]!++] = v;
  }
  const result = new Map<number, number>();
  ranks.forEach((r, j) => {
    const b = rankBins[j]!;
    const list = lists[slot[b]!]!;
    result.set(r, select(list, r - start[b]!, 0, list.length - 1));
  });
  for (const b of rankBins) slot[b] = -1;
  return result;
}

// ---------------------------------------------------------------------------------------------
// Brackets around the normal quantiles

const bracketScratch = { buf: new Float64Array(0) };

/**
 * Fast path for the order statistics near the 5/50/95% points: one pass that counts the values
 * below three narrow brackets (±0.08 sd around mean + z·sd, where the quantiles of a roughly
 * normal sample fall) and keeps the values inside them. Exact when every wanted rank falls in a
 * bracket; returns null otherwise (the caller then uses the histogram method).
 */
export function bracketedOrderStatistics(x: Float64Array, ranks: number[], mean: number, sd: number): Map<number, number> | null {
  const N = x.length;
  if (!(sd > 0)) return null;
  const w = 0.08 * sd;
  const a0 = mean + Z[0]! * sd - w;
  const b0 = mean + Z[0]! * sd + w;
  const a1 = mean - w;
  const b1 = mean + w;
  const a2 = mean + Z[2]! * sd - w;
  const b2 = mean + Z[2]! * sd + w;
  if (bracketScratch.buf.length < 3 * N) bracketScratch.buf = new Float64Array(3 * N);
  const buf = bracketScratch.buf;
  // regions: 0 (<a0) 1 [a0,b0] 2 (b0,a1) 3 [a1,b1] 4 (b1,a2) 5 [a2,b2] 6 (>b2)
  let c0 = 0;
  let c2 = 0;
  let c4 = 0;
  let n1 = 0;
  let n3 = 0;
  let n5 = 0;
  for (let i = 0; i < N; i++) {
    const v = x[i]!;
    if (v < a1) {
      if (v < a0) c0++;
      else if (v <= b0) buf[n1++] = v;
      else c2++;
    } else if (v <= b1) buf[N + n3++] = v;
    else if (v < a2) c4++;
    else if (v <= b2) buf[2 * N + n5++] = v;
  }
  const starts = [c0, c0 + n1 + c2, c0 + n1 + c2 + n3 + c4];
  const sizes = [n1, n3, n5];
  const sorted: (Float64Array | null)[] = [null, null, null];
  const out = new Map<number, number>();
  for (const r of ranks) {
    let hit = -1;
    for (let k = 0; k < 3; k++) if (r >= starts[k]! && r < starts[k]! + sizes[k]!) hit = k;
    if (hit < 0) return null;
    if (!sorted[hit]) sorted[hit] = buf.subarray(hit * N, hit * N + sizes[hit]!).sort();
    out.set(r, sorted[hit]![r - starts[hit]!]!);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Histogram over the range

const BINS = 1024;

/** The order statistics at the given ranks from a histogram of BINS equal bins over [lo, hi] (the sample's range). */
export function rangeOrderStatistics(x: Float64Array, ranks: number[], lo: number, hi: number): Map<number, number> {
  const N = x.length;
  const scale = BINS / (hi - lo);
  const counts = new Int32Array(BINS);
  for (let i = 0; i < N; i++) {
    let b = ((x[i]! - lo) * scale) | 0;
    if (b >= BINS) b = BINS - 1;
    counts[b]!++;
  }
  // Bin holding each rank, and the rank's position within that bin.
  const start = new Int32Array(BINS + 1);
  const rankBins = binsOfRanks(counts, BINS, ranks, start);
  const binSlot = new Int32Array(BINS).fill(-1);
  const { lists, fill } = listsForBins(rankBins, counts, binSlot);
  for (let i = 0; i < N; i++) {
    const v = x[i]!;
    let b = ((v - lo) * scale) | 0;
    if (b >= BINS) b = BINS - 1;
    const slot = binSlot[b]!;
    if (slot >= 0) lists[slot]![fill[slot]!++] = v;
  }
  for (const list of lists) list.sort();
  const out = new Map<number, number>();
  ranks.forEach((r, j) => {
    const b = rankBins[j]!;
    out.set(r, lists[binSlot[b]!]![r - start[b]!]!);
  });
  return out;
}

// ---------------------------------------------------------------------------------------------
// Shared by the two histograms

/**
 * The bin holding each rank (0-based, in ascending order of the values) of a histogram of `bins`
 * bins; fills start[b] with the number of values in the bins before b (so the rank's place in its
 * bin is r − start[b]).
 */
function binsOfRanks(counts: Int32Array, bins: number, ranks: number[], start: Int32Array): number[] {
  start[0] = 0;
  for (let b = 0; b < bins; b++) start[b + 1] = start[b]! + counts[b]!;
  const binOf = (r: number): number => {
    let a = 0;
    let c = bins - 1;
    while (a < c) {
      const mid = (a + c) >>> 1;
      if (start[mid + 1]! <= r) a = mid + 1;
      else c = mid;
    }
    return a;
  };
  return ranks.map(binOf);
}

/** One list per distinct bin of `rankBins`, sized for its values, numbered in slot[b] (which must hold −1 elsewhere). */
function listsForBins(rankBins: number[], counts: Int32Array, slot: Int32Array): { lists: Float64Array[]; fill: number[] } {
  const lists: Float64Array[] = [];
  const fill: number[] = [];
  for (const b of rankBins)
    if (slot[b] === -1) {
      slot[b] = lists.length;
      lists.push(new Float64Array(counts[b]!));
      fill.push(0);
    }
  return { lists, fill };
}

/** Hoare quickselect: returns the k-th smallest of x[lo..hi] (0-based within the array), reordering x. */
function select(x: Float64Array, k: number, lo: number, hi: number): number {
  let l = lo;
  let r = hi;
  while (r > l) {
    const mid = (l + r) >>> 1;
    const a = x[l]!;
    const b = x[mid]!;
    const c = x[r]!;
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : a < c ? a : b < c ? c : b;
    let i = l;
    let j = r;
    while (i <= j) {
      while (x[i]! < pivot) i++;
      while (x[j]! > pivot) j--;
      if (i <= j) {
        const t = x[i]!;
        x[i] = x[j]!;
        x[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) r = j;
    else if (k >= i) l = i;
    else break;
  }
  return x[k]!;
}
