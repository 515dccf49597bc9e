import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { cobbDouglasCost, cobbDouglasTechnology } from './cobb-douglas-technology.js';
import { dualAt, solveCommitted, type SolveSuccess, type Technology } from './contracted-core.js';
import { evaluateContracted, type ContractedOptions } from './contracted.js';
import { EstimationInputError } from './errors.js';
import { formOf } from './forms.js';
import { netputsFromDecomposition, type ModelLayout } from './model.js';
import { nqIndex } from './nq.js';
import { fitForecastModel } from './panel.js';
import { generateForecastPanel, PER_HECTARE_ITEMS } from './synthetic-panel.js';

// Checks of the contracted-output engine (method: docs/cost-duality.md). Each check names its
// outside source beside it; the Cobb–Douglas closed forms are textbook results (from memory, see
// below) and one page stored from the web, re-derived in docs/cost-duality.md §5.

// ---------------------------------------------------------------------------------------------
// A Cobb–Douglas technology y = A·x1^a1·x2^a2 (a1 + a2 = r < 1) given to the engine only through its
// profit function (Hotelling's lemma): the engine's general Newton solve must recover the known cost
// function. Profit and cost functions with their sources: cobb-douglas-technology.ts.
const cobbDouglas = cobbDouglasTechnology;

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('the engine on a Cobb–Douglas technology (outside source: textbook closed-form cost function)', () => {
  const A = 2;
  const a: [number, number] = [0.3, 0.5];
  const w: [number, number] = [3, 4];
  const y = 12;
  const tech = cobbDouglas(A, a);
  // start far from the answer: the general solve must find it
  const sol = solveCommitted(tech, [1, w[0], w[1]], [0], [y]) as SolveSuccess;
  const ref = cobbDouglasCost(A, a, w, y);

  it('finds the output price at which supply is the committed quantity (round trip y(p*) = y*)', () => {
    expect(sol.ok).toBe(true);
    expect(rel(sol.netputs[0]!, y)).toBeLessThan(1e-11);
    expect(rel(tech.netputs(sol.prices)[0]!, y)).toBeLessThan(1e-11);
  });

  it('marginal cost p* = C/(r·y) (Varian ch. 4, from memory)', () => {
    expect(rel(sol.prices[0]!, ref.mc)).toBeLessThan(1e-10);
  });

  it('reproduces the check point of docs/sources.md §12 (computed from the closed form with 30-digit arithmetic)', () => {
    const d = dualAt(tech, sol, [0])!;
    expect(rel(d.cost, 65.344688474631777)).toBeLessThan(1e-12);
    expect(rel(-sol.netputs[1]!, 8.1680860593289722)).toBeLessThan(1e-12);
    expect(rel(-sol.netputs[2]!, 10.210107574161215)).toBeLessThan(1e-12);
    expect(rel(sol.prices[0]!, 6.8067383827741435)).toBeLessThan(1e-12);
  });

  it('conditional factor demands x_j = a_j·C/(r·w_j) and cost C = p*·y* − π(p*, w) (Varian ch. 4–5, from memory)', () => {
    const d = dualAt(tech, sol, [0])!;
    expect(rel(-sol.netputs[1]!, ref.x[0]!)).toBeLessThan(1e-10);
    expect(rel(-sol.netputs[2]!, ref.x[1]!)).toBeLessThan(1e-10);
    expect(rel(d.cost, ref.C)).toBeLessThan(1e-10);
    expect(rel(d.cost, sol.prices[0]! * y - tech.profit(sol.prices))).toBeLessThan(1e-10);
    expect(rel(d.inputSpending, ref.C)).toBeLessThan(1e-10);
  });

  it('conditional elasticities a_l/r − δ_jl, output elasticity 1/r, marginal-cost slope MC·(1/r − 1)/y (closed forms of the same cost function)', () => {
    const d = dualAt(tech, sol, [0])!;
    const r = a[0] + a[1];
    // rest = inputs 1, 2; elasticity of x_j w.r.t. w_l from the conditional netput responses
    for (let j = 0; j < 2; j++)
      for (let l = 0; l < 2; l++) {
        const e = (d.conditional[j]![l]! * w[l]!) / sol.netputs[j + 1]!;
        expect(Math.abs(e - (a[l]! / r - (j === l ? 1 : 0)))).toBeLessThan(1e-9);
        // unconditional (profit function): −a_l/(1−r) − δ_jl
        const u = (d.unconditional[j]![l]! * w[l]!) / sol.netputs[j + 1]!;
        expect(Math.abs(u - (-a[l]! / (1 - r) - (j === l ? 1 : 0)))).toBeLessThan(1e-9);
      }
    for (let j = 0; j < 2; j++) expect(Math.abs((d.restPerCommitted[j]![0]! * y) / sol.netputs[j + 1]! - 1 / r)).toBeLessThan(1e-9);
    expect(rel(d.marginalCostSlope[0]![0]!, (ref.mc * (1 / r - 1)) / y)).toBeLessThan(1e-9);
  });

  it('with A = 1 agrees with the stored closed form L*(q) = ((w/r)(β/α))^{−β/(α+β)} q^{1/(α+β)}, K*(q) = ((w/r)(β/α))^{α/(α+β)} q^{1/(α+β)} (vcalc.com/wiki/Cost-Minimizing-Inputs-Cobb-Douglas)', () => {
    const alpha = 0.4;
    const beta = 0.35;
    const wage = 12;
    const rent = 7;
    const q = 25;
    const t = cobbDouglas(1, [alpha, beta]);
    const s = solveCommitted(t, [3, wage, rent], [0], [q]) as SolveSuccess;
    const ratio = (wage / rent) * (beta / alpha);
    const L = Math.pow(ratio, -beta / (alpha + beta)) * Math.pow(q, 1 / (alpha + beta));
    const K = Math.pow(ratio, alpha / (alpha + beta)) * Math.pow(q, 1 / (alpha + beta));
    expect(rel(-s.netputs[1]!, L)).toBeLessThan(1e-10);
    expect(rel(-s.netputs[2]!, K)).toBeLessThan(1e-10);
    expect(rel(dualAt(t, s, [0])!.cost, wage * L + rent * K)).toBeLessThan(1e-10);
    // docs/sources.md §12, second check point (30-digit arithmetic from the page's formulas)
    expect(rel(-s.netputs[1]!, 60.498428089475912)).toBeLessThan(1e-12);
    expect(rel(-s.netputs[2]!, 90.747642134213868)).toBeLessThan(1e-12);
  });
});

// ---------------------------------------------------------------------------------------------
// Random well-posed normalized quadratic technologies: outputs o0, o1; inputs x0, x1 and the
// numeraire x2. B = LL' + εI (convex), parameters drawn so that supply and demand have the right
// signs near the reference prices; committed quantities are the supply at random positive prices.

const SEED = 19_0601;
// eslint-disable-next-line no-console
console.info(`contracted.test.ts: fast-check seeds ${SEED} (homogeneity), ${SEED + 1} (concavity), ${SEED + 2} (Le Chatelier), ${SEED + 3} (round trip); replay with { seed, path } from a failure report`);

const NQ_LAYOUT: ModelLayout = (() => {
  const items = [
    { name: 'o0', role: 'output' as const },
    { name: 'o1', role: 'output' as const },
    { name: 'x0', role: 'input' as const },
    { name: 'x1', role: 'input' as const },
    { name: 'x2', role: 'input' as const },
  ];
  return { form: 'normalized-quadratic', items, numeraire: 'x2', factors: [], quadraticFactors: 0, trendOrigin: null, parameterNames: formOf('normalized-quadratic').parameterNames(items, [], 0) };
})();

function nqTech(theta: number[]): Technology {
  const form = formOf('normalized-quadratic');
  return {
    roles: NQ_LAYOUT.items.map((i) => i.role),
    netputs: (p) => netputsFromDecomposition(form.decompose(NQ_LAYOUT, theta, p), []),
    hessian: (p) => form.priceHessian(NQ_LAYOUT, theta, p),
    linearIn: (c) => !c.includes(4),
  };
}

const nqCase = fc
  .record({
    L: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 16, maxLength: 16 }),
    a: fc.array(fc.double({ min: 0.5, max: 3, noNaN: true }), { minLength: 4, maxLength: 4 }),
    a0: fc.double({ min: -20, max: -5, noNaN: true }),
    w: fc.array(fc.double({ min: 0.5, max: 2, noNaN: true }), { minLength: 3, maxLength: 3 }),
    pOut: fc.array(fc.double({ min: 0.5, max: 2, noNaN: true }), { minLength: 2, maxLength: 2 }),
    w2: fc.array(fc.double({ min: 0.5, max: 2, noNaN: true }), { minLength: 3, maxLength: 3 }),
    t: fc.double({ min: 0.2, max: 5, noNaN: true }),
    lambda: fc.double({ min: 0, max: 1, noNaN: true }),
  })
  .map((c) => {
    const ix = nqIndex(5, 0, 0);
    const th = new Array<number>(ix.size).fill(0);
    // B = LL' + 0.05·I over the 4 non-numeraire items
    const Lm = Array.from({ length: 4 }, (_, i) => Array.from({ length: 4 }, (_, j) => (j <= i ? c.L[i * 4 + j]! : 0)));
    for (let i = 0; i < 4; i++)
      for (let j = i; j < 4; j++) {
        let v = i === j ? 0.05 : 0;
        for (let l = 0; l < 4; l++) v += Lm[i]![l]! * Lm[j]![l]!;
        th[ix.b(i, j)] = v;
      }
    // outputs start positive, inputs negative
    th[ix.a(0)] = c.a[0]!;
    th[ix.a(1)] = c.a[1]!;
    th[ix.a(2)] = -c.a[2]!;
    th[ix.a(3)] = -c.a[3]!;
    th[ix.a0] = c.a0;
    return { ...c, theta: th };
  });

/** Cost C(w, y*) with both outputs committed, through the engine; null when not well posed. */
function costAt(tech: Technology, w: number[], yStar: number[], start: number[]): { C: number; sol: SolveSuccess } | null {
  const s = solveCommitted(tech, [start[0]!, start[1]!, w[0]!, w[1]!, w[2]!], [0, 1], yStar);
  if (!s.ok) return null;
  return { C: dualAt(tech, s, [0, 1])!.cost, sol: s };
}

describe('cost function properties on random well-posed NQ technologies (fast-check, seeded)', () => {
  /** Cases that were well posed (every solve found positive prices), so the property was checked. */
  let checked = 0;
  const exercised = (runs: number) => {
    // most generated cases must be well posed, or the property says little
    expect(checked).toBeGreaterThan(runs / 2);
    checked = 0;
  };
  it('homogeneous of degree one in input prices: C(t·w, y*) = t·C(w, y*) (duality theory; Varian ch. 5)', () => {
    fc.assert(
      fc.property(nqCase, (c) => {
        const tech = nqTech(c.theta);
        const y = tech.netputs([c.pOut[0]!, c.pOut[1]!, ...c.w]);
        const yStar = [y[0]!, y[1]!];
        const base = costAt(tech, c.w, yStar, c.pOut);
        const scaled = costAt(tech, c.w.map((v) => v * c.t), yStar, c.pOut);
        if (!base || !scaled) return true;
        expect(Math.abs(scaled.C - c.t * base.C)).toBeLessThan(1e-8 * (Math.abs(c.t * base.C) + 1));
        // marginal costs scale the same way
        expect(rel(scaled.sol.prices[0]!, c.t * base.sol.prices[0]!)).toBeLessThan(1e-8);
        checked++;
        return true;
      }),
      { numRuns: 200, seed: SEED },
    );
    exercised(200);
  });

  it('concave in input prices: C(λw + (1−λ)w′) ≥ λC(w) + (1−λ)C(w′) (duality theory; Varian ch. 5)', () => {
    fc.assert(
      fc.property(nqCase, (c) => {
        const tech = nqTech(c.theta);
        const y = tech.netputs([c.pOut[0]!, c.pOut[1]!, ...c.w]);
        const yStar = [y[0]!, y[1]!];
        const mid = c.w.map((v, i) => c.lambda * v + (1 - c.lambda) * c.w2[i]!);
        const A = costAt(tech, c.w, yStar, c.pOut);
        const B = costAt(tech, c.w2, yStar, c.pOut);
        const M = costAt(tech, mid, yStar, c.pOut);
        if (!A || !B || !M) return true;
        const chord = c.lambda * A.C + (1 - c.lambda) * B.C;
        expect(M.C).toBeGreaterThanOrEqual(chord - 1e-9 * (Math.abs(chord) + 1));
        checked++;
        return true;
      }),
      { numRuns: 200, seed: SEED + 1 },
    );
    exercised(200);
  });

  it("Le Chatelier: conditional own-price elasticities never exceed the unconditional ones in absolute value, and conditional demands slope down", () => {
    fc.assert(
      fc.property(nqCase, fc.integer({ min: 0, max: 2 }), (c, which) => {
        const tech = nqTech(c.theta);
        const p = [c.pOut[0]!, c.pOut[1]!, ...c.w];
        const y = tech.netputs(p);
        // partial contracting too: commit o0 only (which = 0), o1 only (1), or both (2)
        const committed = which === 2 ? [0, 1] : [which];
        const s = solveCommitted(tech, p, committed, committed.map((i) => y[i]!));
        if (!s.ok) return true;
        const d = dualAt(tech, s, committed)!;
        d.rest.forEach((item, r) => {
          if (tech.roles[item] !== 'input') return;
          const cond = (d.conditional[r]![r]! * s.prices[item]!) / s.netputs[item]!;
          const unc = (d.unconditional[r]![r]! * s.prices[item]!) / s.netputs[item]!;
          expect(Math.abs(cond)).toBeLessThanOrEqual(Math.abs(unc) + 1e-12);
          // netput slope ≥ 0 ⇔ input demand slopes down
          expect(d.conditional[r]![r]!).toBeGreaterThanOrEqual(-1e-12);
        });
        checked++;
        return true;
      }),
      { numRuns: 300, seed: SEED + 2 },
    );
    exercised(300);
  });

  it('round trip: committing the supply at prices p gives back p as marginal cost, and the conditional demands equal the unconditional ones there', () => {
    fc.assert(
      fc.property(nqCase, (c) => {
        const tech = nqTech(c.theta);
        const p = [c.pOut[0]!, c.pOut[1]!, ...c.w];
        const y = tech.netputs(p);
        const s = solveCommitted(tech, [7, 0.1, ...c.w], [0, 1], [y[0]!, y[1]!]);
        if (!s.ok) return true; // the start's sign test only; p itself is positive, so s is ok
        expect(rel(s.prices[0]!, p[0]!)).toBeLessThan(1e-9);
        expect(rel(s.prices[1]!, p[1]!)).toBeLessThan(1e-9);
        for (let i = 2; i < 5; i++) expect(Math.abs(s.netputs[i]! - y[i]!)).toBeLessThan(1e-9 * (Math.abs(y[i]!) + 1));
        checked++;
        return true;
      }),
      { numRuns: 200, seed: SEED + 3 },
    );
    exercised(200);
  });
});

// ---------------------------------------------------------------------------------------------
// The forecasting model on a synthetic panel with known truth (invented data).

const panel = generateForecastPanel({ items: PER_HECTARE_ITEMS, farms: 40, seasons: 8, firstSeason: 2010, seed: 11 });
const model = fitForecastModel(panel.dataset);
const fx = model.farmEffects!;
const land = (j: number) => fx.lastLand[j]!;
const farm = (j: number, contracted: Record<string, number>, extra: Partial<ContractedOptions['farms'][number]> = {}) => ({ farm: fx.farms[j]!, fixed: { land: land(j) }, contracted, ...extra });
const pointOf = (opts: Omit<ContractedOptions, 'draws'>) => evaluateContracted(model, { ...opts, draws: 0 });

/** Central finite difference with a relative step. */
function fd(f: (v: number) => number, v: number, h = 1e-4): number {
  const d = h * Math.abs(v);
  return (f(v + d) - f(v - d)) / (2 * d);
}

describe('evaluateContracted on the per-hectare forecasting model', () => {
  const prices = { wheat: 250, canola: 520, nitrogen: 1200, diesel: 1.1, other: 100 };

  it.each([
    ['every output committed', { wheat: 6.3, canola: 1.6 }],
    ['partial contracting (canola free)', { wheat: 6.3 }],
  ])("Shephard's lemma by finite differences: ∂C/∂w_j = x_j^c (%s)", (_, perHa) => {
    const spec = farm(3, Object.fromEntries(Object.entries(perHa).map(([k, v]) => [k, v * land(3)])));
    const at = (over: Record<string, number>) => pointOf({ farms: [spec], prices: { ...prices, ...over } }).farms[0]!;
    const base = at({});
    expect(base.evaluated).toBe(true);
    for (const input of ['nitrogen', 'diesel', 'other']) {
      const dC = fd((v) => at({ [input]: v }).cost!.point, prices[input as keyof typeof prices]);
      expect(rel(dC, base.inputs[input]!.point)).toBeLessThan(1e-6);
    }
  });

  it.each([
    ['every output committed', { wheat: 6.3, canola: 1.6 }],
    ['partial contracting (canola free)', { wheat: 6.3 }],
  ])('marginal cost = ∂C/∂y* by finite differences (%s), and its slope = ∂MC/∂y*', (_, perHa) => {
    const q = Object.fromEntries(Object.entries(perHa).map(([k, v]) => [k, v * land(3)]));
    const at = (over: Record<string, number>) => pointOf({ farms: [farm(3, { ...q, ...over })], prices }).farms[0]!;
    const base = at({});
    for (const out of Object.keys(q)) {
      const dC = fd((v) => at({ [out]: v }).cost!.point, q[out]!);
      expect(rel(dC, base.outputs[out]!.marginalCost!.point)).toBeLessThan(1e-6);
      const dMC = fd((v) => at({ [out]: v }).outputs[out]!.marginalCost!.point, q[out]!);
      expect(rel(dMC, base.outputs[out]!.marginalCostSlope!)).toBeLessThan(1e-6);
    }
  });

  it('round trip on a farm: committing its own projected supply at the stated prices gives those prices back as marginal costs', () => {
    const free = pointOf({ farms: [farm(5, { wheat: 1 })], prices }).farms[0]!; // canola supply with wheat committed: not needed
    void free;
    // the farm's unconditional supply at the stated prices, from the engine's own netputs
    const form = formOf(model.fit.layout.form);
    const p = model.fit.layout.items.map((it) => prices[it.name as keyof typeof prices]);
    const y = netputsFromDecomposition(form.decompose(model.fit.layout, model.fit.theta, p), []).map((v, i) => (v + fx.effects[i]![5]!) * land(5));
    const r = pointOf({ farms: [farm(5, { wheat: y[0]!, canola: y[1]! })], prices }).farms[0]!;
    expect(rel(r.outputs.wheat!.marginalCost!.point, 250)).toBeLessThan(1e-9);
    expect(rel(r.outputs.canola!.marginalCost!.point, 520)).toBeLessThan(1e-9);
    for (const input of ['nitrogen', 'diesel', 'other']) expect(rel(r.inputs[input]!.point, r.unconditionalInputs[input]!)).toBeLessThan(1e-9);
  });

  it('the linear solve used in the draws agrees with the general Newton solve', () => {
    const farms = [farm(0, { wheat: 6.2 * land(0) }, { contractPrices: { wheat: 240 } }), farm(1, { wheat: 6 * land(1), canola: 1.5 * land(1) })];
    const fast = evaluateContracted(model, { farms, prices, draws: 300, seed: 4 });
    const slow = evaluateContracted(model, { farms, prices, draws: 300, seed: 4, generalSolve: true });
    fast.farms.forEach((f, j) => {
      for (const [k, v] of Object.entries(f.outputs)) expect(rel(v.marginalCost!.upper, slow.farms[j]!.outputs[k]!.marginalCost!.upper)).toBeLessThan(1e-8);
      for (const [k, v] of Object.entries(f.inputs)) expect(rel(v.mean, slow.farms[j]!.inputs[k]!.mean)).toBeLessThan(1e-8);
      expect(rel(f.cost!.sd, slow.farms[j]!.cost!.sd)).toBeLessThan(1e-8);
      expect(f.belowZeroDrawShare).toBe(slow.farms[j]!.belowZeroDrawShare);
    });
    expect(rel(fast.coop.margin.wheat?.mean ?? 0, slow.coop.margin.wheat?.mean ?? 0)).toBeLessThan(1e-8);
  });

  it('co-op: the sums of the farms at the point, bands that hold the point, reproducible with the seed', () => {
    const farms = [0, 1, 2, 3].map((j) => farm(j, { wheat: 6.4 * land(j) }, { contractPrices: { wheat: 230 } }));
    const r = evaluateContracted(model, { farms, prices, draws: 400, seed: 9 });
    const again = evaluateContracted(model, { farms, prices, draws: 400, seed: 9 });
    expect(again).toEqual(r);
    expect(r.coop.farmsEvaluated).toBe(4);
    for (const input of ['nitrogen', 'diesel', 'other']) {
      const sum = r.farms.reduce((a, f) => a + f.inputs[input]!.point, 0);
      expect(rel(r.coop.inputs[input]!.point, sum)).toBeLessThan(1e-12);
    }
    expect(rel(r.coop.cost.point, r.farms.reduce((a, f) => a + f.cost!.point, 0))).toBeLessThan(1e-12);
    const Q = r.farms.reduce((a, f) => a + f.outputs.wheat!.quantity, 0);
    expect(rel(r.coop.marginalCost.wheat!.point, r.farms.reduce((a, f) => a + f.outputs.wheat!.quantity * f.outputs.wheat!.marginalCost!.point, 0) / Q)).toBeLessThan(1e-12);
    expect(rel(r.coop.margin.wheat!.point, 230 - r.coop.marginalCost.wheat!.point)).toBeLessThan(1e-9);
    for (const f of r.farms) {
      const mc = f.outputs.wheat!.marginalCost!;
      expect(mc.lower).toBeLessThanOrEqual(mc.point);
      expect(mc.upper).toBeGreaterThanOrEqual(mc.point);
      expect(mc.sd).toBeGreaterThan(0);
      // margin = contract price − marginal cost, draw by draw
      expect(rel(f.outputs.wheat!.margin!.mean, 230 - mc.mean)).toBeLessThan(1e-9);
    }
  });

  it('bands follow the projection: few seasons widen a figure by the t of its own Welch–Satterthwaite degrees of freedom, the co-op (season-dominated) more than a farm (docs/forecasting.md §6)', () => {
    expect(model.seasonEffects!.df).toBeLessThan(10);
    const many = structuredClone(model);
    many.seasonEffects!.df = 1e9; // as if the season shock's scale were known: no widening
    const farms = [0, 1, 2, 3, 4, 5].map((j) => farm(j, { wheat: 6.4 * land(j) }));
    const few = evaluateContracted(model, { farms, prices, draws: 600, seed: 2 });
    const known = evaluateContracted(many, { farms, prices, draws: 600, seed: 2 });
    const width = (b: { lower: number; upper: number }) => b.upper - b.lower;
    const coopRatio = width(few.coop.inputs.nitrogen!) / width(known.coop.inputs.nitrogen!);
    const farmRatio = width(few.farms[0]!.inputs.nitrogen!) / width(known.farms[0]!.inputs.nitrogen!);
    expect(farmRatio).toBeGreaterThanOrEqual(1);
    expect(coopRatio).toBeGreaterThan(farmRatio);
    // the same draws: only the stretch differs, so the medians agree
    expect(few.coop.inputs.nitrogen!.median).toBe(known.coop.inputs.nitrogen!.median);
    expect(width(few.coop.marginalCost.wheat!)).toBeGreaterThan(width(known.coop.marginalCost.wheat!));
  });

  it('Le Chatelier on the fitted model: every conditional own-price elasticity is at most the unconditional one in absolute value', () => {
    const r = pointOf({ farms: [0, 1, 2].map((j) => farm(j, { wheat: 6.5 * land(j) })), prices });
    for (const f of [...r.farms.map((x) => x.elasticities!), r.coop.elasticities!]) {
      f.conditional.rows.forEach((row, i) => {
        const c = f.conditional.columns.indexOf(row);
        expect(f.conditional.values[i]![c]!).toBeLessThanOrEqual(1e-12);
        expect(Math.abs(f.conditional.values[i]![c]!)).toBeLessThanOrEqual(Math.abs(f.unconditional.values[i]![c]!) + 1e-12);
      });
    }
  });

  it('says in words when a commitment is out of reach or beyond the farm’s own record, and leaves that farm out of the co-op sums', () => {
    const r = evaluateContracted(model, {
      farms: [farm(0, { wheat: 6.3 * land(0) }), farm(1, { wheat: 0.05 * land(1) }, { history: { wheat: [5.1, 6.2, 5.8] } }), farm(2, { wheat: 9 * land(2) }, { history: { wheat: [5.1, 6.2, 5.8] } })],
      prices,
      draws: 200,
      units: { wheat: 't' },
    });
    const low = r.farms[1]!;
    expect(low.evaluated).toBe(false);
    expect(low.issues.find((i) => i.kind === 'out-of-reach')!.text).toMatch(/out of reach .* at positive prices: the fitted technology would grow more wheat than that even at a price near zero/);
    expect(low.outputs.wheat!.marginalCost).toBeNull();
    const high = r.farms[2]!;
    expect(high.evaluated).toBe(true);
    expect(high.issues[0]!.kind).toBe('beyond-history');
    expect(high.issues[0]!.text).toMatch(/more wheat per hectare than farm .* has grown in any of its 3 recorded seasons \(at most 6\.2 t\/ha\)/);
    expect(r.coop.farmsLeftOut).toEqual([fx.farms[1]]);
    expect(r.coop.quantities.wheat).toBeCloseTo(6.3 * land(0) + 9 * land(2), 9);
  });

  it('says in words when the fitted supply does not respond to the price (singular block)', () => {
    const flat = structuredClone(model);
    const names = flat.fit.layout.parameterNames;
    flat.fit.theta[names.indexOf('b[wheat,wheat]')] = 0;
    flat.fit.theta[names.indexOf('b[wheat,canola]')] = 0;
    flat.fit.theta[names.indexOf('b[wheat,nitrogen]')] = 0;
    flat.fit.theta[names.indexOf('b[wheat,diesel]')] = 0;
    const r = evaluateContracted(flat, { farms: [farm(0, { wheat: 6 * land(0) })], prices, draws: 0 });
    expect(r.farms[0]!.evaluated).toBe(false);
    expect(r.farms[0]!.issues[0]!.kind).toBe('singular');
    expect(r.farms[0]!.issues[0]!.text).toMatch(/does not respond to its own price/);
  });

  it('rejects unusable options with a message that names what and where', () => {
    const bad = (farms: ContractedOptions['farms'], msg: RegExp) => expect(() => evaluateContracted(model, { farms, draws: 0 })).toThrow(msg);
    bad([farm(0, { nitrogen: 3 })], /farm F\d+: nitrogen is an input; only outputs can be committed/);
    bad([farm(0, { barley: 3 })], /committed item "barley" is not an item of the model/);
    bad([farm(0, { wheat: -1 })], /the committed quantity of wheat must be a number above 0, got -1/);
    bad([farm(0, {})], /no farm commits any output/);
    bad([{ farm: 'X', fixed: {}, contracted: { wheat: 1 } }], /farm X: land \(land\) must be given/);
    bad([farm(0, { wheat: 5 }, { contractPrices: { canola: 500 } })], /a contract price is given for canola, which the farm has not committed/);
    expect(() => evaluateContracted(model, { farms: [farm(0, { wheat: 5 })], draws: 50 })).toThrow(EstimationInputError);
  });
});

describe('the generalized Leontief model (general Newton solve)', () => {
  const gl = fitForecastModel(panel.dataset, { form: 'gl' });
  const prices = { wheat: 250, canola: 520, nitrogen: 1200, diesel: 1.1, other: 100 };
  const glLand = gl.farmEffects!.lastLand;
  const spec = (q: Record<string, number>) => ({ farm: gl.farmEffects!.farms[2]!, fixed: { land: glLand[2]! }, contracted: q });
  const at = (q: Record<string, number>, p: Record<string, number> = {}) => evaluateContracted(gl, { farms: [spec(q)], prices: { ...prices, ...p }, draws: 0 }).farms[0]!;

  it('the Newton solve written out for the draws agrees with the general one, draw by draw', () => {
    const farms = [0, 1, 2].map((j) => ({ farm: gl.farmEffects!.farms[j]!, fixed: { land: glLand[j]! }, contracted: (j === 1 ? { wheat: 6 * glLand[j]!, canola: 1.4 * glLand[j]! } : { wheat: 6.1 * glLand[j]! }) as Record<string, number> }));
    const fast = evaluateContracted(gl, { farms, prices, draws: 300, seed: 8 });
    const slow = evaluateContracted(gl, { farms, prices, draws: 300, seed: 8, generalSolve: true });
    fast.farms.forEach((f, j) => {
      const g = slow.farms[j]!;
      expect(f.failedDrawShare).toBe(g.failedDrawShare);
      for (const [k, v] of Object.entries(f.outputs)) {
        expect(rel(v.marginalCost!.mean, g.outputs[k]!.marginalCost!.mean)).toBeLessThan(1e-8);
        expect(rel(v.marginalCost!.upper, g.outputs[k]!.marginalCost!.upper)).toBeLessThan(1e-8);
      }
      for (const [k, v] of Object.entries(f.inputs)) expect(rel(v.sd, g.inputs[k]!.sd)).toBeLessThan(1e-8);
    });
  });

  it("round trip, Shephard's lemma and marginal cost by finite differences", () => {
    const q = { wheat: 6.2 * glLand[2]!, canola: 1.5 * glLand[2]! };
    const base = at(q);
    expect(base.evaluated).toBe(true);
    const mc: number[] = [base.outputs.wheat!.marginalCost!.point, base.outputs.canola!.marginalCost!.point];
    // round trip: the model's supply at p* is the committed quantity
    const layout = gl.fit.layout;
    const p = layout.items.map((it) => (it.name === 'wheat' ? mc[0]! : it.name === 'canola' ? mc[1]! : prices[it.name as keyof typeof prices]));
    const y = netputsFromDecomposition(formOf('generalized-leontief').decompose(layout, gl.fit.theta, p), []).map((v, i) => (v + gl.farmEffects!.effects[i]![2]!) * glLand[2]!);
    expect(rel(y[layout.items.findIndex((i) => i.name === 'wheat')]!, q.wheat)).toBeLessThan(1e-9);
    expect(rel(y[layout.items.findIndex((i) => i.name === 'canola')]!, q.canola)).toBeLessThan(1e-9);
    for (const input of ['nitrogen', 'diesel'])
      expect(rel(fd((v) => at(q, { [input]: v }).cost!.point, prices[input as keyof typeof prices]), base.inputs[input]!.point)).toBeLessThan(1e-5);
    expect(rel(fd((v) => at({ ...q, wheat: v }).cost!.point, q.wheat), mc[0]!)).toBeLessThan(1e-5);
  });
});

describe('a committed numeraire (the normalized quadratic through the general solve)', () => {
  const nm = fitForecastModel(panel.dataset, { numeraire: 'wheat' });
  const prices = { wheat: 250, canola: 520, nitrogen: 1200, diesel: 1.1, other: 100 };
  const L = nm.fit.layout;
  const nmLand = nm.farmEffects!.lastLand;
  const supplyAt = (j: number, pWheat: number) => {
    const p = L.items.map((it) => (it.name === 'wheat' ? pWheat : prices[it.name as keyof typeof prices]));
    const y = netputsFromDecomposition(formOf(L.form).decompose(L, nm.fit.theta, p), []);
    const w = L.items.findIndex((it) => it.name === 'wheat');
    return (y[w]! + nm.farmEffects!.effects[w]![j]!) * nmLand[j]!;
  };
  const spec = (j: number, wheat: number) => ({ farm: nm.farmEffects!.farms[j]!, fixed: { land: nmLand[j]! }, contracted: { wheat } });

  it('round trip: committing the supply at 250 gives 250 back as the marginal cost', () => {
    expect(L.numeraire).toBe('wheat');
    const r = evaluateContracted(nm, { farms: [spec(0, supplyAt(0, 250))], prices, draws: 0 }).farms[0]!;
    expect(rel(r.outputs.wheat!.marginalCost!.point, 250)).toBeLessThan(1e-9);
  });

  it("Shephard's lemma by finite differences when the numeraire's own price is solved for", () => {
    const q = supplyAt(0, 300);
    const at = (p: Record<string, number>) => evaluateContracted(nm, { farms: [spec(0, q)], prices: { ...prices, ...p }, draws: 0 }).farms[0]!;
    const base = at({});
    for (const input of ['nitrogen', 'diesel', 'other'])
      expect(rel(fd((v) => at({ [input]: v }).cost!.point, prices[input as keyof typeof prices]), base.inputs[input]!.point)).toBeLessThan(1e-6);
  });

  it('says in words when the commitment is more than the technology supplies at any price (the numeraire’s supply has a ceiling), and when many draws cannot reach it', () => {
    const ceiling = supplyAt(1, 1e7);
    const r = evaluateContracted(nm, { farms: [spec(1, 1.05 * ceiling), spec(0, 0.995 * supplyAt(0, 1e7))], prices, draws: 300, units: { wheat: 't' } });
    expect(r.farms[0]!.evaluated).toBe(false);
    expect(r.farms[0]!.issues[0]!.text).toMatch(/t of wheat \([\d.]+ t\/ha\) is more than the fitted technology can supply on farm .* at any price/);
    const near = r.farms[1]!;
    expect(near.evaluated).toBe(true);
    expect(near.failedDrawShare).toBeGreaterThan(0.05);
    expect(near.belowZeroDrawShare).toBe(0);
    expect(near.issues.find((i) => !i.blocking && i.kind === 'out-of-reach')!.text).toMatch(/draws of the model's uncertainty the committed quantity is more than the technology of that draw can supply at any price/);
  });
});
