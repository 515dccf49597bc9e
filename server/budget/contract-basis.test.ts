import { describe, expect, it } from 'vitest';
import { cobbDouglasCost, cobbDouglasTechnology } from '../estimation/cobb-douglas-technology.js';
import { dualAt, solveCommitted, type ContractedFarmResult } from '../estimation/index.js';
import { conditionalPart } from './contracted-source.js';
import { elasticitiesOfSum, respondDemand } from './scenarios.js';

// A budget on the contract basis (server/budget/contracted-source.ts): output is held at the
// contracted tonnage, so a fertiliser price scenario moves only the input mix, by the conditional
// (cost-side) elasticities the engine computed. Outside source: the closed-form cost function of a
// Cobb–Douglas technology (textbook result, from memory: Varian, Microeconomic Analysis, 3rd ed. 1992,
// ch. 4–5; Mas-Colell, Whinston & Green 1995, §5.C; re-derived in docs/cost-duality.md §5, check
// points in docs/sources.md §12): x_j^c = a_j·C/(r·w_j) with C = r·(y/A)^{1/r}·Π_j (w_j/a_j)^{a_j/r},
// so ∂ln x_j^c/∂ln w_l = a_l/r − δ_jl — constant, so the budget's constant-elasticity response is exact.

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const items = { nitrogen: { code: 'n', kgPerUnit: 1 }, phosphate: { code: 'p', kgPerUnit: 1 }, potash: { code: 'k', kgPerUnit: 1 } };

describe('the contract basis under a fertiliser price scenario (Cobb–Douglas closed form)', () => {
  // y = 2·N^0.3·P^0.2·K^0.1 (r = 0.6), 8 t committed, N 1.20, P2O5 0.90, K2O 0.60 per kg.
  const A = 2;
  const a = [0.3, 0.2, 0.1];
  const w = [1.2, 0.9, 0.6];
  const y = 8;
  const tech = cobbDouglasTechnology(A, a);
  /** The engine's cost-side evaluation of the committed 8 t at input prices ws (given only the profit function). */
  const engineAt = (ws: number[]) => {
    const sol = solveCommitted(tech, [1, ...ws], [0], [y]);
    if (!sol.ok) throw new Error('the solve failed');
    return { sol, dual: dualAt(tech, sol, [0])! };
  };
  /** The farm as the evaluation reports it: conditional demand and the conditional elasticity table (docs/cost-duality.md §4: S_jl·p_l / y_j). */
  const farmResult = (ws: number[]): ContractedFarmResult => {
    const { sol, dual } = engineAt(ws);
    const codes = ['n', 'p', 'k'];
    return {
      evaluated: true,
      inputs: Object.fromEntries(codes.map((c, j) => [c, { point: -sol.netputs[j + 1]! }])),
      elasticities: {
        conditional: { rows: codes, columns: codes, values: codes.map((_, j) => codes.map((_, l) => (dual.conditional[j]![l]! * ws[l]!) / sol.netputs[j + 1]!)) },
        unconditional: { rows: [], columns: [], values: [] },
        output: { rows: [], columns: [], values: [] },
      },
    } as unknown as ContractedFarmResult;
  };

  it('reads the engine’s conditional demand and elasticities a_l/r − δ_jl (closed form)', () => {
    const part = conditionalPart(farmResult(w), items)!;
    const ref = cobbDouglasCost(A, a, w, y);
    // docs/sources.md §12, third check point (30-digit arithmetic)
    expect(rel(part.demand.nitrogen, 11.215863182208806)).toBeLessThan(1e-10);
    expect(rel(part.demand.phosphate, ref.x[1]!)).toBeLessThan(1e-10);
    expect(rel(part.demand.potash, ref.x[2]!)).toBeLessThan(1e-10);
    const r = 0.6;
    const ns = ['nitrogen', 'phosphate', 'potash'] as const;
    ns.forEach((i, j) => ns.forEach((l, k) => expect(Math.abs(part.elasticities[i][l] - (a[k]! / r - (j === k ? 1 : 0)))).toBeLessThan(1e-9)));
  });

  it('nitrogen +20 %: N falls by 1.2^(a1/r − 1) = 1.2^−0.5 and P2O5, K2O rise by 1.2^0.5, as the cost function at the new price says', () => {
    const part = conditionalPart(farmResult(w), items)!;
    const after = respondDemand(part.demand, part.elasticities, { nitrogen: 20 });
    // docs/sources.md §12: x^c at w1 = 1.44 (30-digit arithmetic)
    expect(rel(after.nitrogen, 10.23863544464573)).toBeLessThan(1e-9);
    expect(rel(after.phosphate, 10.921211140955445)).toBeLessThan(1e-9);
    expect(rel(after.potash, 8.190908355716584)).toBeLessThan(1e-9);
    expect(rel(after.nitrogen / part.demand.nitrogen, 1.2 ** -0.5)).toBeLessThan(1e-9);
    // The engine's own evaluation at the new prices (the exact figure a budget shows beside) agrees.
    const again = engineAt([1.44, 0.9, 0.6]).sol;
    expect(rel(-again.netputs[1]!, after.nitrogen)).toBeLessThan(1e-9);
    // Output stays at the contracted 8 t; the marginal cost rises with the input price.
    expect(rel(again.netputs[0]!, y)).toBeLessThan(1e-11);
    expect(rel(again.prices[0]!, cobbDouglasCost(A, a, [1.44, 0.9, 0.6], y).mc)).toBeLessThan(1e-10);
  });
});

describe('elasticities of a demand total made of parts', () => {
  it('weights each part by its share of the nutrient (hand values)', () => {
    const z = { nitrogen: 0, phosphate: 0, potash: 0 };
    const e1 = { nitrogen: { ...z, nitrogen: -0.2, phosphate: 0.1 }, phosphate: { ...z, nitrogen: 0.05, phosphate: -0.3 }, potash: { ...z, potash: -0.1 } };
    const e2 = { nitrogen: { ...z, nitrogen: -0.6, phosphate: -0.1 }, phosphate: { ...z, nitrogen: -0.05, phosphate: -0.5 }, potash: { ...z, potash: -0.4 } };
    const e = elasticitiesOfSum([
      { demand: { nitrogen: 30_000, phosphate: 10_000, potash: 0 }, elasticities: e1 },
      { demand: { nitrogen: 10_000, phosphate: 10_000, potash: 5_000 }, elasticities: e2 },
    ]);
    // N: (30·−0.2 + 10·−0.6)/40 = −0.3; N on P: (30·0.1 + 10·−0.1)/40 = 0.05; P: (−0.3 − 0.5)/2 = −0.4; K: the second part only.
    expect(e.nitrogen.nitrogen).toBeCloseTo(-0.3, 12);
    expect(e.nitrogen.phosphate).toBeCloseTo(0.05, 12);
    expect(e.phosphate.phosphate).toBeCloseTo(-0.4, 12);
    expect(e.phosphate.nitrogen).toBeCloseTo(0, 12);
    expect(e.potash.potash).toBeCloseTo(-0.4, 12);
  });
});
