/**
 * Duality core (docs/cost-duality.md): from a profit function π(p) — any technology that gives its
 * netputs y(p) = ∇π (Hotelling's lemma) and price Hessian H(p) = ∇²π — find, for committed outputs
 * y*_c, the prices p*_c at which the profit-maximising supply equals y*_c, the other prices held.
 * Then p*_c are the marginal costs (the envelope theorem), the remaining netputs at p* are the
 * conditional demands (Shephard's lemma), the cost is C = p*_c·y*_c − π(p*), and the conditional price
 * responses are the Schur complement S = H_rr − H_rc H_cc⁻¹ H_cr (Le Chatelier: S_jj ≤ H_jj).
 * Pure arithmetic on small dense matrices (no allocation-heavy library calls): it runs once per farm
 * and Monte Carlo draw.
 */
import type { Mat } from './linalg.js';

/** A technology given by its profit function's gradient and Hessian in prices. */
export interface Technology {
  /** Item roles, in the order of every price and netput vector. */
  roles: readonly ('output' | 'input')[];
  /** y(p): netputs (outputs positive, inputs negative) at prices p. */
  netputs(p: ArrayLike<number>): number[];
  /** ∇²π(p) (n×n, symmetric). */
  hessian(p: ArrayLike<number>): Mat;
  /** True when the committed netputs are linear in the committed prices (the first Newton step is exact). */
  linearIn?(committed: readonly number[]): boolean;
}

export type SolveFailure =
  /** No positive prices reach the targets; `direction` says whether the items in `items` would need a price at or below zero ('low') or beyond any bound ('high'). */
  | { ok: false; reason: 'out-of-reach'; items: number[]; direction: 'low' | 'high'; prices: number[] }
  /** H_cc is singular or not positive definite at the prices reached: supply does not respond to price. */
  | { ok: false; reason: 'singular'; items: number[]; prices: number[] }
  | { ok: false; reason: 'no-solution'; items: number[]; prices: number[] };

export interface SolveSuccess {
  ok: true;
  /** Full price vector: p*_c for the committed items, the given prices elsewhere. */
  prices: number[];
  /** Netputs at p* (committed ones equal their targets to the tolerance). */
  netputs: number[];
  iterations: number;
  /** Committed items whose solution price is at or below zero (only with keepNonPositive). */
  nonPositive?: number[];
}

export type SolveResult = SolveSuccess | SolveFailure;

export interface SolveOptions {
  maxIterations?: number;
  /** Relative tolerance on the committed netputs (default 1e-11). */
  tolerance?: number;
  /**
   * For a technology linear in the committed prices: return the exact solution even when a price is
   * at or below zero (flagged `nonPositive`), instead of reporting it out of reach.
   */
  keepNonPositive?: boolean;
}

/**
 * Solve y_c(p) = targets for the committed prices by Newton's method (Jacobian H_cc), safeguarded to
 * keep prices positive. `prices` is the full vector; its committed entries are the starting point.
 */
export function solveCommitted(tech: Technology, prices: ArrayLike<number>, committed: readonly number[], targets: ArrayLike<number>, options: SolveOptions = {}): SolveResult {
  const m = committed.length;
  const p = Array.from(prices);
  const maxIt = options.maxIterations ?? 200;
  const tol = options.tolerance ?? 1e-11;
  const start = committed.map((c) => p[c]!);
  const linear = tech.linearIn?.(committed) ?? false;
  let y = tech.netputs(p);
  const scale = committed.map((c, k) => Math.max(Math.abs(targets[k]!), Math.abs(y[c]!), 1e-300));
  const resid = (yy: number[]): number[] => committed.map((c, k) => targets[k]! - yy[c]!);
  const norm = (r: number[]): number => r.reduce((acc, v, k) => Math.max(acc, Math.abs(v) / scale[k]!), 0);
  let r = resid(y);
  let rn = norm(r);
  for (let it = 0; it <= maxIt; it++) {
    if (rn <= tol) return { ok: true, prices: p, netputs: y, iterations: it };
    if (it === maxIt) break;
    const H = tech.hessian(p);
    const Hcc = committed.map((a) => committed.map((b) => H[a]![b]!));
    const pc = committed.map((c) => p[c]!);
    const delta = solveSpd(Hcc, r, pc);
    if (!delta) return { ok: false, reason: 'singular', items: singularItems(Hcc, pc).map((k) => committed[k]!), prices: p };
    if (linear) {
      // exact: the solution is p_c + δ, whatever its sign
      const next = pc.map((v, k) => v + delta[k]!);
      const bad = next.map((v, k) => (v > 0 ? -1 : k)).filter((k) => k >= 0);
      if (bad.length && options.keepNonPositive) {
        committed.forEach((c, k) => (p[c] = next[k]!));
        const yy = tech.netputs(p);
        return { ok: true, prices: p, netputs: yy, iterations: it + 1, nonPositive: bad.map((k) => committed[k]!) };
      }
      if (bad.length) {
        const q = p.slice();
        committed.forEach((c, k) => (q[c] = next[k]!));
        return { ok: false, reason: 'out-of-reach', items: bad.map((k) => committed[k]!), direction: 'low', prices: q };
      }
    }
    // keep every price above a fifth of its current value
    let t = 1;
    if (!linear) for (let k = 0; k < m; k++) if (pc[k]! + t * delta[k]! < 0.2 * pc[k]!) t = (-0.8 * pc[k]!) / delta[k]!;
    let accepted = false;
    for (let half = 0; half < 40; half++) {
      const q = p.slice();
      committed.forEach((c, k) => (q[c] = pc[k]! + t * delta[k]!));
      const yq = tech.netputs(q);
      const rq = resid(yq);
      const rqn = norm(rq);
      if (Number.isFinite(rqn) && (rqn < rn || (linear && half === 0))) {
        committed.forEach((c, k) => (p[c] = q[c]!));
        y = yq;
        r = rq;
        rn = rqn;
        accepted = true;
        break;
      }
      t /= 2;
    }
    if (!accepted) break;
    const low = committed.filter((c, k) => p[c]! < 1e-9 * start[k]!);
    if (low.length) return { ok: false, reason: 'out-of-reach', items: low, direction: 'low', prices: p };
    const high = committed.filter((c, k) => p[c]! > 1e9 * start[k]!);
    if (high.length) return { ok: false, reason: 'out-of-reach', items: high, direction: 'high', prices: p };
  }
  // Not settled: say which way the prices were heading.
  const low = committed.filter((c, k) => p[c]! < 1e-4 * start[k]!);
  if (low.length) return { ok: false, reason: 'out-of-reach', items: low, direction: 'low', prices: p };
  const high = committed.filter((c, k) => p[c]! > 1e4 * start[k]!);
  if (high.length) return { ok: false, reason: 'out-of-reach', items: high, direction: 'high', prices: p };
  return { ok: false, reason: 'no-solution', items: committed.filter((c, k) => Math.abs(r[k]!) / scale[k]! > tol), prices: p };
}

export interface DualPoint {
  /** C = Σ_c p*_c y*_c − π(p*) = −Σ_{i∉c} p_i y_i. */
  cost: number;
  /** Σ_inputs w_j x_j (x_j = −y_j). */
  inputSpending: number;
  /** Items not committed (inputs and free outputs), in item order. */
  rest: number[];
  /** S = H_rr − H_rc H_cc⁻¹ H_cr: conditional responses of the rest's netputs to the rest's prices. */
  conditional: Mat;
  /** H_rr: the unconditional responses at the same prices. */
  unconditional: Mat;
  /** ∂y_r/∂y*_c = H_rc H_cc⁻¹. */
  restPerCommitted: Mat;
  /** ∂p*_c/∂y*_c = H_cc⁻¹ (the slope of marginal cost). */
  marginalCostSlope: Mat;
}

/** Cost and the conditional second-order responses at a solution. Null when H_cc is singular there. */
export function dualAt(tech: Technology, sol: SolveSuccess, committed: readonly number[]): DualPoint | null {
  const n = tech.roles.length;
  const p = sol.prices;
  const y = sol.netputs;
  const isC = new Array<boolean>(n).fill(false);
  for (const c of committed) isC[c] = true;
  const rest = Array.from({ length: n }, (_, i) => i).filter((i) => !isC[i]);
  const [cost, spend] = costAndSpending(tech.roles, isC, p, y);
  const H = tech.hessian(p);
  const Hcc = committed.map((a) => committed.map((b) => H[a]![b]!));
  const pc = committed.map((c) => p[c]!);
  const inv = inverseSpd(Hcc, pc);
  if (!inv) return null;
  const Hrc = rest.map((a) => committed.map((b) => H[a]![b]!));
  const A = Hrc.map((row) => committed.map((_, l) => row.reduce((acc, v, k) => acc + v * inv[k]![l]!, 0)));
  const unconditional = rest.map((a) => rest.map((b) => H[a]![b]!));
  const conditional = rest.map((a, ia) => rest.map((b, ib) => unconditional[ia]![ib]! - A[ia]!.reduce((acc, v, k) => acc + v * H[committed[k]!]![b]!, 0)));
  return { cost, inputSpending: spend, rest, conditional, unconditional, restPerCommitted: A, marginalCostSlope: inv };
}

/**
 * At prices p and netputs y (per unit of land for the per-hectare model): the cost
 * C = −Σ_{i not committed} p_i y_i (spending on the inputs less the revenue of the free outputs) and
 * the input spending Σ_inputs −p_j y_j. The same arithmetic at the point (dualAt), in every draw and
 * in every step of the bands' sensitivities.
 */
export function costAndSpending(roles: readonly string[], committed: readonly boolean[], p: ArrayLike<number>, y: ArrayLike<number>): [cost: number, spending: number] {
  let cost = 0;
  let spend = 0;
  for (let i = 0; i < roles.length; i++) {
    if (!committed[i]) cost -= p[i]! * y[i]!;
    if (roles[i] === 'input') spend -= p[i]! * y[i]!;
  }
  return [cost, spend];
}

/**
 * Solve H x = r for symmetric positive definite H, scaled by D = diag(p) for the pivot test
 * (D H D has the units of revenue in every entry). Null when a pivot of the scaled Cholesky factor is
 * not clearly positive (singular or not convex).
 */
export function solveSpd(H: Mat, r: ArrayLike<number>, p: ArrayLike<number>): number[] | null {
  const L = scaledCholesky(H, p);
  if (!L) return null;
  const m = H.length;
  // (D H D)(D⁻¹ x) = D r
  const b = Array.from({ length: m }, (_, k) => r[k]! * p[k]!);
  const z = new Array<number>(m).fill(0);
  for (let i = 0; i < m; i++) {
    let s = b[i]!;
    for (let j = 0; j < i; j++) s -= L[i]![j]! * z[j]!;
    z[i] = s / L[i]![i]!;
  }
  const u = new Array<number>(m).fill(0);
  for (let i = m - 1; i >= 0; i--) {
    let s = z[i]!;
    for (let j = i + 1; j < m; j++) s -= L[j]![i]! * u[j]!;
    u[i] = s / L[i]![i]!;
  }
  return u.map((v, k) => v * p[k]!);
}

export function inverseSpd(H: Mat, p: ArrayLike<number>): Mat | null {
  const m = H.length;
  const cols: number[][] = [];
  for (let j = 0; j < m; j++) {
    const e = new Array<number>(m).fill(0);
    e[j] = 1;
    const x = solveSpd(H, e, p);
    if (!x) return null;
    cols.push(x);
  }
  return Array.from({ length: m }, (_, i) => Array.from({ length: m }, (_, j) => cols[j]![i]!));
}

/** Relative pivot floor of the scaled Cholesky factorisation. */
const PIVOT_FLOOR = 1e-10;

function scaledCholesky(H: Mat, p: ArrayLike<number>): Mat | null {
  const m = H.length;
  const A = H.map((row, i) => row.map((v, j) => v * p[i]! * p[j]!));
  let maxDiag = 0;
  for (let i = 0; i < m; i++) maxDiag = Math.max(maxDiag, Math.abs(A[i]![i]!));
  if (!(maxDiag > 0) || !Number.isFinite(maxDiag)) return null;
  const L = A.map(() => new Array<number>(m).fill(0));
  for (let i = 0; i < m; i++)
    for (let j = 0; j <= i; j++) {
      let s = 0.5 * (A[i]![j]! + A[j]![i]!);
      for (let k = 0; k < j; k++) s -= L[i]![k]! * L[j]![k]!;
      if (i === j) {
        if (!(s > PIVOT_FLOOR * maxDiag)) return null;
        L[i]![i] = Math.sqrt(s);
      } else L[i]![j] = s / L[j]![j]!;
    }
  return L;
}

/** The committed items (positions in H) whose own scaled response is not clearly positive, or all when none alone is. */
function singularItems(H: Mat, p: ArrayLike<number>): number[] {
  const m = H.length;
  let maxDiag = 0;
  for (let i = 0; i < m; i++) maxDiag = Math.max(maxDiag, Math.abs(H[i]![i]! * p[i]! * p[i]!));
  const own = Array.from({ length: m }, (_, i) => i).filter((i) => !(H[i]![i]! * p[i]! * p[i]! > PIVOT_FLOOR * maxDiag) || !(maxDiag > 0));
  return own.length ? own : Array.from({ length: m }, (_, i) => i);
}
