/**
 * Generalized Leontief (GL) profit function (docs/profit-functions.md §3), with fixed factors:
 *   π = Σ_i Σ_j b_ij √(p_i p_j) + Σ_i p_i (Σ_k c_ik z_k + ½ Σ_k Σ_l g_ikl z_k z_l),   b_ij = b_ji
 *   y_i = b_ii + Σ_{j≠i} b_ij √(p_j/p_i) + Σ_k c_ik z_k + ½ Σ_k Σ_l g_ikl z_k z_l
 * Linearly homogeneous by construction, so no numeraire is needed; symmetry b_ij = b_ji is the
 * cross-equation restriction. The price Hessian depends on p, so convexity is checked per point.
 */
import type { NetputItem } from './dataset.js';
import { zeros, type Mat } from './linalg.js';
import { column, type CurvatureBlock, type ModelData, type ModelLayout, type NetputDecomposition, type ProfitForm } from './model.js';
import type { SurEquationInput } from './sur.js';

export interface GlIndex {
  n: number;
  m: number;
  q: number;
  b: (i: number, j: number) => number;
  c: (i: number, k: number) => number;
  g: (i: number, k: number, l: number) => number;
  size: number;
}

const tri = (i: number, j: number, size: number): number => {
  const [r, c] = i <= j ? [i, j] : [j, i];
  return r * size - (r * (r - 1)) / 2 + (c - r);
};

export function glIndex(n: number, m: number, q: number): GlIndex {
  const nb = (n * (n + 1)) / 2;
  const ng = (q * (q + 1)) / 2;
  const cStart = nb;
  const gStart = cStart + n * m;
  return {
    n,
    m,
    q,
    b: (i, j) => tri(i, j, n),
    c: (i, k) => cStart + i * m + k,
    g: (i, k, l) => gStart + i * ng + tri(k, l, q),
    size: gStart + n * ng,
  };
}

const idx = (layout: ModelLayout): GlIndex => glIndex(layout.items.length, layout.factors.length, layout.quadraticFactors);

export const generalizedLeontief: ProfitForm = {
  name: 'generalized-leontief',

  parameterNames(items: NetputItem[], factors: string[], q: number): string[] {
    const ix = glIndex(items.length, factors.length, q);
    const names = new Array<string>(ix.size);
    const it = items.map((x) => x.name);
    for (let i = 0; i < ix.n; i++) {
      for (let j = i; j < ix.n; j++) names[ix.b(i, j)] = `b[${it[i]},${it[j]}]`;
      for (let k = 0; k < ix.m; k++) names[ix.c(i, k)] = `c[${it[i]},${factors[k]}]`;
      for (let k = 0; k < q; k++) for (let l = k; l < q; l++) names[ix.g(i, k, l)] = `g[${it[i]},${factors[k]},${factors[l]}]`;
    }
    return names;
  },

  decompose(layout: ModelLayout, th: ArrayLike<number>, prices: ArrayLike<number>): NetputDecomposition {
    const ix = idx(layout);
    const { n, m, q } = ix;
    const constant: number[] = [];
    const linear: Mat = [];
    const quadratic: Mat[] = [];
    for (let i = 0; i < n; i++) {
      let v = th[ix.b(i, i)]!;
      for (let j = 0; j < n; j++) if (j !== i) v += th[ix.b(i, j)]! * Math.sqrt(prices[j]! / prices[i]!);
      constant.push(v);
      linear.push(Array.from({ length: m }, (_, k) => th[ix.c(i, k)]!));
      const G = zeros(m, m);
      for (let k = 0; k < q; k++) for (let l = 0; l < q; l++) G[k]![l] = th[ix.g(i, k, l)]!;
      quadratic.push(G);
    }
    return { constant, linear, quadratic };
  },

  priceHessian(layout: ModelLayout, th: ArrayLike<number>, p: ArrayLike<number>): Mat {
    const { n, b } = idx(layout);
    const H = zeros(n, n);
    for (let i = 0; i < n; i++) {
      let diag = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        const bij = th[b(i, j)]!;
        H[i]![j] = (0.5 * bij) / Math.sqrt(p[i]! * p[j]!);
        diag -= 0.5 * bij * Math.sqrt(p[j]!) * Math.pow(p[i]!, -1.5);
      }
      H[i]![i] = diag;
    }
    return H;
  },

  equations(layout: ModelLayout, data: ModelData): { equations: SurEquationInput[]; slots: number[][] } {
    const ix = idx(layout);
    const { n, m, q } = ix;
    const it = layout.items.map((x) => x.name);
    const f = layout.factors;
    const one = new Float64Array(data.T).fill(1);
    const quadCols: { name: string; values: Float64Array; k: number; l: number }[] = [];
    for (let k = 0; k < q; k++)
      for (let l = k; l < q; l++) {
        const zk = data.factors[k]!;
        const zl = data.factors[l]!;
        quadCols.push(
          k === l
            ? { name: `hz_${f[k]}`, values: column(data.T, (t) => 0.5 * zk[t]! * zk[t]!), k, l }
            : { name: `hz_${f[k]}_${f[l]}`, values: column(data.T, (t) => zk[t]! * zl[t]!), k, l },
        );
      }
    const equations: SurEquationInput[] = [];
    const slots: number[][] = [];
    for (let i = 0; i < n; i++) {
      const regs: { name: string; values: ArrayLike<number> }[] = [{ name: '(Intercept)', values: one }];
      const sl = [ix.b(i, i)];
      const pi = data.prices[i]!;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        const pj = data.prices[j]!;
        regs.push({ name: `s_${it[j]}`, values: column(data.T, (t) => Math.sqrt(pj[t]! / pi[t]!)) });
        sl.push(ix.b(i, j));
      }
      for (let k = 0; k < m; k++) {
        regs.push({ name: f[k]!, values: data.factors[k]! });
        sl.push(ix.c(i, k));
      }
      for (const qc of quadCols) {
        regs.push({ name: qc.name, values: qc.values });
        sl.push(ix.g(i, qc.k, qc.l));
      }
      equations.push({ name: it[i]!, y: data.netputs[i]!, regressors: regs });
      slots.push(sl);
    }
    return { equations, slots };
  },

  curvatureBlock(layout: ModelLayout, ref: ArrayLike<number>): CurvatureBlock {
    // M = D H D with D = diag(√p⁰): M_ij = ½ b_ij (i ≠ j) and M s = 0 for s = √p⁰, so
    // M_ii = −Σ_{j≠i} M_ij s_j / s_i. C is the leading (n−1) block of M.
    const ix = idx(layout);
    const { n } = ix;
    const s = Array.from({ length: n }, (_, i) => Math.sqrt(ref[i]!));
    const indices: number[] = [];
    const pairs: [number, number][] = [];
    for (let i = 0; i < n; i++)
      for (let j = i + 1; j < n; j++) {
        indices.push(ix.b(i, j));
        pairs.push([i, j]);
      }
    const nn = n - 1;
    return {
      indices,
      size: nn,
      global: false,
      toMatrix(th) {
        const C = zeros(nn, nn);
        for (let i = 0; i < nn; i++) {
          let diag = 0;
          for (let j = 0; j < n; j++) {
            if (j === i) continue;
            const mij = 0.5 * th[ix.b(i, j)]!;
            if (j < nn) C[i]![j] = mij;
            diag -= (mij * s[j]!) / s[i]!;
          }
          C[i]![i] = diag;
        }
        return C;
      },
      fromMatrix(c) {
        const b = zeros(n, n);
        for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) if (i !== j) b[i]![j] = c[i]![j]! + c[j]![i]!; // 2·sym(C)
        for (let i = 0; i < nn; i++) {
          let sum = 0;
          for (let j = 0; j < nn; j++) if (j !== i) sum += b[i]![j]! * s[j]!;
          b[i]![nn] = -(2 * c[i]![i]! * s[i]! + sum) / s[nn]!;
        }
        return pairs.map(([i, j]) => b[i]![j]!);
      },
    };
  },
};
