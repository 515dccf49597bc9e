/**
 * Normalized quadratic (NQ) profit function with a numeraire (docs/profit-functions.md §2):
 *   π/p_n = a0 + Σ a_i p̃_i + ½ Σ Σ b_ij p̃_i p̃_j + Σ Σ c_ik p̃_i z_k + Σ d_k z_k + ½ Σ Σ g_kl z_k z_l,
 * p̃_i = p_i/p_n, b and g symmetric, g only over the fixed factors (the trend enters linearly).
 * Hotelling's lemma gives one netput equation per item:
 *   y_i = a_i + Σ_j b_ij p̃_j + Σ_k c_ik z_k                                 (i < n)
 *   y_n = a0 − ½ Σ Σ b_ij p̃_i p̃_j + Σ_k d_k z_k + ½ Σ Σ g_kl z_k z_l         (numeraire)
 * The numeraire equation is linear in the parameters, with the b's shared across equations.
 */
import type { NetputItem } from './dataset.js';
import { zeros, type Mat } from './linalg.js';
import { column, type CurvatureBlock, type ModelData, type ModelLayout, type NetputDecomposition, type ProfitForm } from './model.js';
import type { SurEquationInput } from './sur.js';

export interface NqIndex {
  nn: number;
  m: number;
  q: number;
  a: (i: number) => number;
  b: (i: number, j: number) => number;
  c: (i: number, k: number) => number;
  a0: number;
  d: (k: number) => number;
  g: (k: number, l: number) => number;
  size: number;
}

export function nqIndex(n: number, m: number, q: number): NqIndex {
  const nn = n - 1;
  const bStart = nn;
  const triIndex = (i: number, j: number, size: number): number => {
    const [r, c] = i <= j ? [i, j] : [j, i];
    return r * size - (r * (r - 1)) / 2 + (c - r);
  };
  const nb = (nn * (nn + 1)) / 2;
  const cStart = bStart + nb;
  const a0 = cStart + nn * m;
  const dStart = a0 + 1;
  const gStart = dStart + m;
  const size = gStart + (q * (q + 1)) / 2;
  return {
    nn,
    m,
    q,
    a: (i) => i,
    b: (i, j) => bStart + triIndex(i, j, nn),
    c: (i, k) => cStart + i * m + k,
    a0,
    d: (k) => dStart + k,
    g: (k, l) => gStart + triIndex(k, l, q),
    size,
  };
}

const idx = (layout: ModelLayout): NqIndex => nqIndex(layout.items.length, layout.factors.length, layout.quadraticFactors);

export const normalizedQuadratic: ProfitForm = {
  name: 'normalized-quadratic',

  parameterNames(items: NetputItem[], factors: string[], q: number): string[] {
    const ix = nqIndex(items.length, factors.length, q);
    const names = new Array<string>(ix.size);
    const it = items.map((x) => x.name);
    for (let i = 0; i < ix.nn; i++) {
      names[ix.a(i)] = `a[${it[i]}]`;
      for (let j = i; j < ix.nn; j++) names[ix.b(i, j)] = `b[${it[i]},${it[j]}]`;
      for (let k = 0; k < ix.m; k++) names[ix.c(i, k)] = `c[${it[i]},${factors[k]}]`;
    }
    names[ix.a0] = 'a0';
    for (let k = 0; k < ix.m; k++) names[ix.d(k)] = `d[${factors[k]}]`;
    for (let k = 0; k < q; k++) for (let l = k; l < q; l++) names[ix.g(k, l)] = `g[${factors[k]},${factors[l]}]`;
    return names;
  },

  decompose(layout: ModelLayout, th: ArrayLike<number>, prices: ArrayLike<number>): NetputDecomposition {
    const ix = idx(layout);
    const { nn, m, q } = ix;
    const pn = prices[nn]!;
    const pt = Array.from({ length: nn }, (_, j) => prices[j]! / pn);
    const constant: number[] = [];
    const linear: Mat = [];
    const quadratic: Mat[] = [];
    let quad = 0;
    for (let i = 0; i < nn; i++) {
      let v = th[ix.a(i)]!;
      for (let j = 0; j < nn; j++) {
        const bij = th[ix.b(i, j)]!;
        v += bij * pt[j]!;
        quad += bij * pt[i]! * pt[j]!;
      }
      constant.push(v);
      linear.push(Array.from({ length: m }, (_, k) => th[ix.c(i, k)]!));
      quadratic.push(zeros(m, m));
    }
    constant.push(th[ix.a0]! - 0.5 * quad);
    linear.push(Array.from({ length: m }, (_, k) => th[ix.d(k)]!));
    const G = zeros(m, m);
    for (let k = 0; k < q; k++) for (let l = 0; l < q; l++) G[k]![l] = th[ix.g(k, l)]!;
    quadratic.push(G);
    return { constant, linear, quadratic };
  },

  priceHessian(layout: ModelLayout, th: ArrayLike<number>, prices: ArrayLike<number>): Mat {
    // H = (1/p_n) [I; −p̃'] B [I, −p̃]
    const ix = idx(layout);
    const { nn } = ix;
    const n = nn + 1;
    const pn = prices[nn]!;
    const pt = Array.from({ length: nn }, (_, j) => prices[j]! / pn);
    const H = zeros(n, n);
    const Bp = new Array<number>(nn).fill(0);
    let pBp = 0;
    for (let i = 0; i < nn; i++)
      for (let j = 0; j < nn; j++) {
        const bij = th[ix.b(i, j)]!;
        H[i]![j] = bij / pn;
        Bp[i]! += bij * pt[j]!;
      }
    for (let i = 0; i < nn; i++) {
      pBp += pt[i]! * Bp[i]!;
      H[i]![nn] = -Bp[i]! / pn;
      H[nn]![i] = -Bp[i]! / pn;
    }
    H[nn]![nn] = pBp / pn;
    return H;
  },

  equations(layout: ModelLayout, data: ModelData): { equations: SurEquationInput[]; slots: number[][] } {
    const ix = idx(layout);
    const { nn, m, q } = ix;
    const T = data.T;
    const it = layout.items.map((x) => x.name);
    const f = layout.factors;
    const pn = data.prices[nn]!;
    const pt = Array.from({ length: nn }, (_, j) => column(T, (t) => data.prices[j]![t]! / pn[t]!));
    const one = new Float64Array(T).fill(1);
    const equations: SurEquationInput[] = [];
    const slots: number[][] = [];
    for (let i = 0; i < nn; i++) {
      const regs = [{ name: '(Intercept)', values: one as ArrayLike<number> }];
      const sl = [ix.a(i)];
      for (let j = 0; j < nn; j++) {
        regs.push({ name: `p_${it[j]}`, values: pt[j]! });
        sl.push(ix.b(i, j));
      }
      for (let k = 0; k < m; k++) {
        regs.push({ name: f[k]!, values: data.factors[k]! });
        sl.push(ix.c(i, k));
      }
      equations.push({ name: it[i]!, y: data.netputs[i]!, regressors: regs });
      slots.push(sl);
    }
    const regs = [{ name: '(Intercept)', values: one as ArrayLike<number> }];
    const sl = [ix.a0];
    for (let k = 0; k < m; k++) {
      regs.push({ name: f[k]!, values: data.factors[k]! });
      sl.push(ix.d(k));
    }
    for (let k = 0; k < q; k++)
      for (let l = k; l < q; l++) {
        const zk = data.factors[k]!;
        const zl = data.factors[l]!;
        regs.push(
          k === l
            ? { name: `hz_${f[k]}`, values: column(T, (t) => 0.5 * zk[t]! * zk[t]!) }
            : { name: `hz_${f[k]}_${f[l]}`, values: column(T, (t) => zk[t]! * zl[t]!) },
        );
        sl.push(ix.g(k, l));
      }
    for (let i = 0; i < nn; i++)
      for (let j = i; j < nn; j++) {
        const pi = pt[i]!;
        const pj = pt[j]!;
        regs.push(
          i === j
            ? { name: `hp_${it[i]}`, values: column(T, (t) => -0.5 * pi[t]! * pi[t]!) }
            : { name: `hp_${it[i]}_${it[j]}`, values: column(T, (t) => -pi[t]! * pj[t]!) },
        );
        sl.push(ix.b(i, j));
      }
    equations.push({ name: it[nn]!, y: data.netputs[nn]!, regressors: regs });
    slots.push(sl);
    return { equations, slots };
  },

  curvatureBlock(layout: ModelLayout): CurvatureBlock {
    // The leading block of p_n·H is B itself, at every price: convexity is global.
    const ix = idx(layout);
    const { nn } = ix;
    const indices: number[] = [];
    for (let i = 0; i < nn; i++) for (let j = i; j < nn; j++) indices.push(ix.b(i, j));
    return {
      indices,
      size: nn,
      global: true,
      toMatrix(th) {
        return Array.from({ length: nn }, (_, i) => Array.from({ length: nn }, (_, j) => th[ix.b(i, j)]!));
      },
      fromMatrix(c) {
        const out: number[] = [];
        for (let i = 0; i < nn; i++) for (let j = i; j < nn; j++) out.push(0.5 * (c[i]![j]! + c[j]![i]!));
        return out;
      },
    };
  },
};
