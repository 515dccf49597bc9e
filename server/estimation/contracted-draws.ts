/**
 * Contracted deliveries: the solve of one Monte Carlo draw, written out per form so that a draw
 * allocates nothing (docs/cost-duality.md). The normalized quadratic with the numeraire not
 * committed: one linear system; the generalized Leontief: Newton's method with the safeguards of
 * solveCommitted (contracted-core.ts). Other cases use solveCommitted itself.
 */
import type { FarmSetup } from './contracted-setup.js';
import { glIndex } from './gl.js';
import { nqIndex } from './nq.js';
import type { ForecastModel } from './panel.js';

// The normalized quadratic's linear solve, per draw

/**
 * 'ok'; 'below-zero': solved, but a committed output needs a price at or below zero (kept: the
 * linear solution is exact, and a negative marginal cost says the farm would grow more than committed
 * even at a zero price); 'lost-below-zero' / 'lost-beyond': not solved because no positive price reaches the
 * quantity (general solve only); 'failed': singular or not settled.
 */
export type DrawStatus = 'ok' | 'below-zero' | 'lost-below-zero' | 'lost-beyond' | 'failed';

/**
 * For the NQ with the numeraire not committed: B_cc p̃*_c = y*_c/L − μ_c − λ_c − u_c − a_c − B_cr p̃_r − C_c z,
 * then every netput from the NQ equations. No allocation per draw.
 */
export function nqDrawSolver(layout: ForecastModel['fit']['layout'], f: FarmSetup, pointPrices: number[]) {
  const n = layout.items.length;
  const nn = n - 1;
  const m = layout.factors.length;
  const q = layout.quadraticFactors;
  const ix = nqIndex(n, m, q);
  const C = f.committed;
  const mc = C.length;
  const isC = new Uint8Array(n);
  for (const c of C) isC[c] = 1;
  const pn = f.prices[nn]!;
  const pt = new Float64Array(nn);
  for (let j = 0; j < nn; j++) pt[j] = f.prices[j]! / pn;
  // scaling of the pivot test: the point's normalised prices of the committed outputs
  const scale = C.map((c) => Math.abs(pointPrices[c]! / pn) || 1);
  const A = new Float64Array(mc * mc);
  const rhs = new Float64Array(mc);
  const zp = new Float64Array(n);
  const ptS = new Float64Array(nn);
  const bIdx = Array.from({ length: nn }, (_, i) => Int32Array.from({ length: nn }, (_, j) => ix.b(i, j)));
  const z = f.z;
  return (theta: Float64Array, o: number, shift: Float64Array, pr: Float64Array, yr: Float64Array): DrawStatus => {
    for (let i = 0; i < nn; i++) {
      let v = 0;
      for (let kk = 0; kk < m; kk++) v += theta[o + ix.c(i, kk)]! * z[kk]!;
      zp[i] = v;
    }
    {
      let v = 0;
      for (let kk = 0; kk < m; kk++) v += theta[o + ix.d(kk)]! * z[kk]!;
      for (let kk = 0; kk < q; kk++) for (let l = 0; l < q; l++) v += 0.5 * theta[o + ix.g(kk, l)]! * z[kk]! * z[l]!;
      zp[nn] = v;
    }
    for (let a = 0; a < mc; a++) {
      const ca = C[a]!;
      let r = f.target[a]! - shift[ca]! - theta[o + ix.a(ca)]! - zp[ca]!;
      const row = bIdx[ca]!;
      for (let j = 0; j < nn; j++) if (!isC[j]) r -= theta[o + row[j]!]! * pt[j]!;
      rhs[a] = r * scale[a]!;
      for (let b = 0; b < mc; b++) A[a * mc + b] = theta[o + row[C[b]!]!]! * scale[a]! * scale[b]!;
    }
    if (!choleskySolveInPlace(A, rhs, mc)) return 'failed';
    for (let j = 0; j < nn; j++) pr[j] = f.prices[j]!;
    pr[nn] = pn;
    ptS.set(pt);
    let below = false;
    for (let a = 0; a < mc; a++) {
      const v = rhs[a]! * scale[a]!;
      ptS[C[a]!] = v;
      pr[C[a]!] = v * pn;
      if (!(v > 0)) below = true;
    }
    let quad = 0;
    for (let i = 0; i < nn; i++) {
      const row = bIdx[i]!;
      let v = theta[o + ix.a(i)]! + zp[i]! + shift[i]!;
      for (let j = 0; j < nn; j++) {
        const bij = theta[o + row[j]!]!;
        v += bij * ptS[j]!;
        quad += bij * ptS[i]! * ptS[j]!;
      }
      yr[i] = v;
    }
    yr[nn] = theta[o + ix.a0]! - 0.5 * quad + zp[nn]! + shift[nn]!;
    return below ? 'below-zero' : 'ok';
  };
}

/**
 * Solve A x = b in place for a symmetric positive definite m×m A (row-major; only its lower triangle
 * is read): A is overwritten by its Cholesky factor, b by x. False when a pivot is not above 1e-10
 * of the largest diagonal entry (singular or not convex), as in contracted-core.ts. Allocates nothing.
 */
function choleskySolveInPlace(A: Float64Array, b: Float64Array, m: number): boolean {
  let maxDiag = 0;
  for (let a = 0; a < m; a++) maxDiag = Math.max(maxDiag, Math.abs(A[a * m + a]!));
  if (!(maxDiag > 0)) return false;
  for (let a = 0; a < m; a++)
    for (let c = 0; c <= a; c++) {
      let v = A[a * m + c]!;
      for (let l = 0; l < c; l++) v -= A[a * m + l]! * A[c * m + l]!;
      if (a === c) {
        if (!(v > 1e-10 * maxDiag)) return false;
        A[a * m + a] = Math.sqrt(v);
      } else A[a * m + c] = v / A[c * m + c]!;
    }
  for (let a = 0; a < m; a++) {
    let v = b[a]!;
    for (let l = 0; l < a; l++) v -= A[a * m + l]! * b[l]!;
    b[a] = v / A[a * m + a]!;
  }
  for (let a = m - 1; a >= 0; a--) {
    let v = b[a]!;
    for (let l = a + 1; l < m; l++) v -= A[l * m + a]! * b[l]!;
    b[a] = v / A[a * m + a]!;
  }
  return true;
}

/**
 * For the generalized Leontief: Newton's method on the committed prices as in solveCommitted
 * (contracted-core.ts: the same safeguards, tolerance and verdicts), with the netputs
 *   y_i = b_ii + Σ_{j≠i} b_ij √(p_j/p_i) + Σ_k c_ik z_k + ½ Σ_kl g_ikl z_k z_l + shift_i
 * and their price Hessian written out, so that a draw allocates nothing.
 */
export function glDrawSolver(layout: ForecastModel['fit']['layout'], f: FarmSetup, pointPrices: number[]) {
  const n = layout.items.length;
  const m = layout.factors.length;
  const q = layout.quadraticFactors;
  const ix = glIndex(n, m, q);
  const C = f.committed;
  const mc = C.length;
  const bIdx = Array.from({ length: n }, (_, i) => Int32Array.from({ length: n }, (_, j) => ix.b(i, j)));
  const z = f.z;
  const zp = new Float64Array(n);
  const sp = new Float64Array(n);
  const p = new Float64Array(n);
  const y = new Float64Array(n);
  const r = new Float64Array(mc);
  const A = new Float64Array(mc * mc);
  const d = new Float64Array(mc);
  const pc = new Float64Array(mc);
  const scale = new Float64Array(mc);
  const start = C.map((c) => pointPrices[c]!);
  const netputs = (theta: Float64Array, o: number, shift: Float64Array): void => {
    for (let j = 0; j < n; j++) sp[j] = Math.sqrt(p[j]!);
    for (let i = 0; i < n; i++) {
      const row = bIdx[i]!;
      let v = theta[o + row[i]!]! + zp[i]! + shift[i]!;
      for (let j = 0; j < n; j++) if (j !== i) v += (theta[o + row[j]!]! * sp[j]!) / sp[i]!;
      y[i] = v;
    }
  };
  const residualNorm = (): number => {
    let worst = 0;
    for (let a = 0; a < mc; a++) {
      r[a] = f.target[a]! - y[C[a]!]!;
      worst = Math.max(worst, Math.abs(r[a]!) / scale[a]!);
    }
    return worst;
  };
  return (theta: Float64Array, o: number, shift: Float64Array, pr: Float64Array, yr: Float64Array): DrawStatus => {
    for (let i = 0; i < n; i++) {
      let v = 0;
      for (let kk = 0; kk < m; kk++) v += theta[o + ix.c(i, kk)]! * z[kk]!;
      for (let kk = 0; kk < q; kk++) for (let l = 0; l < q; l++) v += 0.5 * theta[o + ix.g(i, kk, l)]! * z[kk]! * z[l]!;
      zp[i] = v;
    }
    for (let j = 0; j < n; j++) p[j] = f.prices[j]!;
    for (let a = 0; a < mc; a++) p[C[a]!] = start[a]!;
    netputs(theta, o, shift);
    for (let a = 0; a < mc; a++) scale[a] = Math.max(Math.abs(f.target[a]!), Math.abs(y[C[a]!]!), 1e-300);
    let rn = residualNorm();
    let settled = false;
    for (let it = 0; it < 200; it++) {
      if (rn <= 1e-11) {
        settled = true;
        break;
      }
      // H_cc (scaled by p_c on both sides) and its Cholesky factor
      for (let a = 0; a < mc; a++) {
        const i = C[a]!;
        for (let b = 0; b < mc; b++) {
          const j = C[b]!;
          let h: number;
          if (i === j) {
            h = 0;
            for (let l = 0; l < n; l++) if (l !== i) h -= 0.5 * theta[o + bIdx[i]![l]!]! * sp[l]! * Math.pow(p[i]!, -1.5);
          } else h = (0.5 * theta[o + bIdx[i]![j]!]!) / (sp[i]! * sp[j]!);
          A[a * mc + b] = h * p[i]! * p[j]!;
        }
      }
      for (let a = 0; a < mc; a++) d[a] = r[a]! * p[C[a]!]!;
      if (!choleskySolveInPlace(A, d, mc)) return 'failed';
      for (let a = 0; a < mc; a++) {
        d[a] = d[a]! * p[C[a]!]!;
        pc[a] = p[C[a]!]!;
      }
      let t = 1;
      for (let a = 0; a < mc; a++) if (pc[a]! + t * d[a]! < 0.2 * pc[a]!) t = (-0.8 * pc[a]!) / d[a]!;
      let accepted = false;
      for (let half = 0; half < 40; half++) {
        for (let a = 0; a < mc; a++) p[C[a]!] = pc[a]! + t * d[a]!;
        netputs(theta, o, shift);
        const next = residualNorm();
        if (Number.isFinite(next) && next < rn) {
          rn = next;
          accepted = true;
          break;
        }
        t /= 2;
      }
      if (!accepted) {
        for (let a = 0; a < mc; a++) p[C[a]!] = pc[a]!;
        break;
      }
      for (let a = 0; a < mc; a++) if (p[C[a]!]! < 1e-9 * start[a]!) return 'lost-below-zero';
      for (let a = 0; a < mc; a++) if (p[C[a]!]! > 1e9 * start[a]!) return 'lost-beyond';
    }
    if (!settled) {
      for (let a = 0; a < mc; a++) if (p[C[a]!]! < 1e-4 * start[a]!) return 'lost-below-zero';
      for (let a = 0; a < mc; a++) if (p[C[a]!]! > 1e4 * start[a]!) return 'lost-beyond';
      return 'failed';
    }
    netputs(theta, o, shift);
    pr.set(p);
    yr.set(y);
    return 'ok';
  };
}
