/**
 * A Cobb–Douglas technology y = A·Π_j x_j^{a_j} (r = Σ a_j < 1), for checks only: the engine is given
 * it solely through its profit function (Hotelling's lemma) and must recover the known cost function.
 * Closed forms (from memory: Varian, Microeconomic Analysis, 3rd ed. 1992, ch. 2, 4–5; Mas-Colell,
 * Whinston & Green 1995, §5.C; re-derived in docs/cost-duality.md §5, check points in docs/sources.md §12):
 *   π(p, w) = (1 − r)·(A·p)^{1/(1−r)}·Π_j (a_j/w_j)^{a_j/(1−r)},
 * with log-derivatives e_p = 1/(1 − r), e_wj = −a_j/(1 − r), so
 *   ∂π/∂p_i = e_i π / p_i,  ∂²π/∂p_i∂p_j = (e_i e_j − δ_ij e_i) π / (p_i p_j);
 *   C(w, y) = r·(y/A)^{1/r}·Π_j (w_j/a_j)^{a_j/r},  x_j^c = a_j·C/(r·w_j),  MC = C/(r·y),
 *   ∂ln x_j^c/∂ln w_l = a_l/r − δ_jl.
 * Items: the output first, then the inputs in the order of a.
 */
import type { Technology } from './contracted-core.js';

export function cobbDouglasTechnology(A: number, a: readonly number[]): Technology & { profit: (p: ArrayLike<number>) => number } {
  const r = a.reduce((s, v) => s + v, 0);
  const e = [1 / (1 - r), ...a.map((aj) => -aj / (1 - r))];
  const profit = (p: ArrayLike<number>): number => a.reduce((v, aj, j) => v * Math.pow(aj / p[j + 1]!, aj / (1 - r)), (1 - r) * Math.pow(A * p[0]!, 1 / (1 - r)));
  return {
    roles: ['output', ...a.map(() => 'input' as const)],
    profit,
    netputs: (p) => {
      const pi = profit(p);
      return e.map((ei, i) => (ei * pi) / p[i]!);
    },
    hessian: (p) => {
      const pi = profit(p);
      return e.map((ei, i) => e.map((ej, j) => ((ei * ej - (i === j ? ei : 0)) * pi) / (p[i]! * p[j]!)));
    },
  };
}

/** The closed-form cost function of the same technology at input prices w and output y. */
export function cobbDouglasCost(A: number, a: readonly number[], w: readonly number[], y: number): { C: number; x: number[]; mc: number } {
  const r = a.reduce((s, v) => s + v, 0);
  const C = a.reduce((v, aj, j) => v * Math.pow(w[j]! / aj, aj / r), r * Math.pow(y / A, 1 / r));
  return { C, x: a.map((aj, j) => (aj * C) / (r * w[j]!)), mc: C / (r * y) };
}
