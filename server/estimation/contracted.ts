/**
 * Contracted deliveries (docs/cost-duality.md): when a farm has committed some of its output, what
 * it buys is its cost-minimising input use for that output, not its profit-maximising one. From the
 * forecasting model's profit function (per hectare with the farm's own level, or pooled in levels):
 *   solve y_c(p*, w, z) + μ_f = y*_c / L for the committed outputs' prices p*_c (other prices held),
 * then p*_c is the marginal cost of each committed output, the inputs demanded at (p*, w) are the
 * conditional demands (Shephard's lemma), C = p*_c·y*_c − π(p*, w) the cost, and the Schur
 * complement of the price Hessian gives the conditional price elasticities (Le Chatelier).
 * For the normalized quadratic with the numeraire not committed the solve is one linear system;
 * otherwise (generalized Leontief, or a committed numeraire) Newton's method (contracted-core.ts).
 *
 * Bands: every draw of the projection's uncertainty (forecast-draws.ts: parameters, the season shock
 * shared by all farms) plus the farm's own level and residual uncertainty shifts the technology; the
 * committed quantities stay fixed, so the marginal cost, conditional demands and cost move instead.
 * Co-op figures are sums over farms within each draw (the marginal cost and margin: tonnage-weighted
 * means). As in the projection, the season parts are drawn at their plug-in scale and each figure's
 * band is stretched to the t of its own Welch–Satterthwaite degrees of freedom (farmStretches).
 * Parts: contracted-setup.ts (each farm checked and in the model's terms), contracted-draws.ts (one
 * draw's solve, per form), contracted-bands.ts (a farm's figures per draw, the co-op's sums, bands and
 * stretches), contracted-words.ts (the words). This file puts them together, with the elasticities.
 * Estimates, not advice.
 */
import type {
  ContractedBand,
  ContractedCoopResult,
  ContractedElasticities,
  ContractedEvaluation,
  ContractedFarmResult,
  ContractedFarmSpec,
  ContractedIssue,
  ContractedOutputResult,
  ElasticityTable,
} from '../../shared/contracted-types.js';
import { CoopSums, FarmFigures, farmStretches, quadForm, summarise, type ItemSets } from './contracted-bands.js';
import { dualAt, solveCommitted, type DualPoint, type SolveFailure, type SolveResult, type Technology } from './contracted-core.js';
import { glDrawSolver, nqDrawSolver, type DrawStatus } from './contracted-draws.js';
import { historyOf, setUp } from './contracted-setup.js';
import { failedDrawsIssue, failureIssues, historyIssues, wrongSignIssues } from './contracted-words.js';
import { drawSettings } from './draw-options.js';
import { EstimationInputError } from './errors.js';
import { NO_STRETCH, projectionHeader, WelchTable, type Stretch } from './forecast.js';
import { drawSharedParts, type SharedDraws } from './forecast-draws.js';
import { formOf } from './forms.js';
import { netputsFromDecomposition } from './model.js';
import type { ForecastModel } from './panel.js';
import { SeededRandom } from './random.js';

export type * from '../../shared/contracted-types.js';

export interface ContractedOptions {
  farms: ContractedFarmSpec[];
  /** Prices every farm faces unless its own say otherwise (inputs, free outputs; a committed output's price is only the solve's start). Items named nowhere: sample means. */
  prices?: Record<string, number>;
  /** Season year evaluated (trend); default the season after the history's last. */
  season?: number;
  /** Central probability of the bands (default 0.9). */
  level?: number;
  /** Simulation draws (default 2000; 0 for the point only; otherwise at least 100). */
  draws?: number;
  seed?: number;
  /** Include parameter uncertainty (default true). */
  parameterUncertainty?: boolean;
  /** Unit of each item for the words (e.g. { wheat: 't' }); optional. */
  units?: Record<string, string>;
  /** Use the general (Newton) solve in every draw even where the normalized quadratic's linear solve applies (slower; for checks). */
  generalSolve?: boolean;
  /** Called now and then with the share done (0–1) and a stage in words. */
  onProgress?: (share: number, stage: string) => void;
}

export const CONTRACTED_CAUTION =
  'Marginal costs and conditional input needs are estimates from the fitted profit function, conditional on the stated input prices and on past relationships; they are not financial advice or a recommendation to sign, price or hedge a contract. Fertiliser rates follow soil tests, local guidance and nutrient-management rules; a certified adviser has the last word.';

/**
 * Evaluate committed outputs against the forecasting model: marginal costs, conditional input
 * demands, cost and conditional elasticities per farm and for the co-op, with bands.
 * @throws EstimationInputError for unusable options (unknown items, committed inputs, bad numbers);
 *   a commitment the technology cannot reach is reported in words per farm, not thrown.
 */
export function evaluateContracted(model: ForecastModel, options: ContractedOptions): ContractedEvaluation {
  const { fit } = model;
  const { layout } = fit;
  const form = formOf(layout.form);
  const n = layout.items.length;
  const k = fit.theta.length;
  const { draws: S, seed, level } = drawSettings(options, { what: 'the contracted evaluation', defaultDraws: 2000, pointOnly: true });
  const perHa = model.spec === 'per-hectare';
  const season = options.season ?? fit.seasonYears.last + 1;
  const itemIndex = new Map(layout.items.map((it, i) => [it.name, i]));
  const roles = layout.items.map((it) => it.role);
  const names = layout.items.map((it) => it.name);
  const units = options.units ?? {};
  const setups = setUp(model, options, season);

  // Which outputs are committed anywhere (item order).
  const anyCommitted = new Array<boolean>(n).fill(false);
  for (const f of setups) for (const c of f.committed) anyCommitted[c] = true;
  const committedOutputs = names.filter((_, i) => anyCommitted[i]);
  if (!committedOutputs.length) throw new EstimationInputError('no farm commits any output: give at least one committed quantity');

  const technology = (theta: ArrayLike<number>, z: number[], shift: ArrayLike<number>): Technology => ({
    roles,
    netputs: (p) => {
      const y = netputsFromDecomposition(form.decompose(layout, theta, p), z);
      for (let i = 0; i < n; i++) y[i]! += shift[i]!;
      return y;
    },
    hessian: (p) => form.priceHessian(layout, theta, p),
    // NQ: non-numeraire netputs are linear in the prices; the numeraire (last) is not.
    linearIn: (c) => layout.form === 'normalized-quadratic' && !c.includes(n - 1),
  });

  // As the projection (forecast.ts): the season parts at their plug-in scale, and each reported
  // figure's band stretched to the Student t of its own Welch–Satterthwaite degrees of freedom.
  const withParams = options.parameterUncertainty ?? true;
  const shared: SharedDraws | null = S > 0 ? drawSharedParts(model, { draws: S, seed, parameterUncertainty: withParams, seasonScale: 'plug-in' }) : null;
  const rng = shared ? shared.rng : new SeededRandom(seed);
  const probs = [...new Set([(1 - level) / 2, 0.05, 0.5, 0.95, (1 + level) / 2])].sort((a, b) => a - b);
  const nu = model.seasonEffects ? model.seasonEffects.df : Infinity;
  const welch = S > 0 && Number.isFinite(nu) ? new WelchTable(nu, probs) : null;
  const Vf = withParams ? model.parameterCovariance.idiosyncratic : null;
  const Vs = withParams && model.seasonEffects ? model.parameterCovariance.season : null;
  const Sl = model.seasonEffects ? model.seasonEffects.covariance : null;
  // Co-op sensitivities for the stretch: rows 0..n−1 marginal-cost numerators by item, n..2n−1
  // margin numerators, 2n..3n−1 netput sums (levels), 3n cost, 3n+1 input spending.
  const CQ = 3 * n + 2;
  const coopJt = welch ? Array.from({ length: CQ }, () => new Float64Array(k)) : null;
  const coopJl = welch ? Array.from({ length: CQ }, () => new Float64Array(n)) : null;
  const coopNoise = new Float64Array(CQ);

  // Co-op sums per draw (a draw counts only where every evaluated farm could be evaluated) and at the point.
  const coopDraws = new CoopSums(n, S);
  const coopAtPoint = new CoopSums(n, 1);
  const coopOk = new Uint8Array(S).fill(1);
  const coopPoint = {
    freeAny: new Array<boolean>(n).fill(false),
    qty: new Array<number>(n).fill(0),
    marginQty: new Array<number>(n).fill(0),
    unconditional: new Array<number>(n).fill(0),
  };
  const coopElast: { farmX: number[]; farm: FarmElasticityParts }[] = [];
  const leftOut: string[] = [];

  const progress = options.onProgress ?? (() => {});
  progress(0.05, `Evaluating ${setups.length} farm${setups.length === 1 ? '' : 's'} over ${S} draws`);
  const farms: ContractedFarmResult[] = setups.map((f, fi) => {
    if (fi > 0 && fi % 10 === 0) progress(0.05 + (0.9 * fi) / setups.length, `Evaluating farm ${fi + 1} of ${setups.length}`);
    const issues: ContractedIssue[] = [];
    const shiftPoint = f.mu;
    const pointTech = technology(fit.theta, f.z, shiftPoint);
    // The outlook's unconditional point at the stated prices.
    const yUncond = pointTech.netputs(f.prices);
    const unconditionalInputs: Record<string, number> = {};
    names.forEach((nm, i) => {
      if (roles[i] === 'input') unconditionalInputs[nm] = Math.max(0, -f.land * yUncond[i]!);
    });
    const history = f.committed.map((c) => historyOf(f.spec, names[c]!));
    /** Contract price of each committed output (undefined where none is given). */
    const contractPrices = f.committed.map((c) => f.spec.contractPrices?.[names[c]!]);
    // Words on commitments beyond the farm's own record.
    issues.push(...historyIssues(f, history, names, units, perHa));

    const sol = solveCommitted(pointTech, f.prices, f.committed, f.target);
    const dual = sol.ok ? dualAt(pointTech, sol, f.committed) : null;
    const emptyOutputs = (): Record<string, ContractedOutputResult> =>
      Object.fromEntries(
        f.committed.map((c, j) => [
          names[c]!,
          {
            quantity: f.quantity[j]!,
            perHectare: perHa ? f.target[j]! : null,
            marginalCost: null,
            marginalCostSlope: null,
            contractPrice: contractPrices[j] ?? null,
            margin: null,
            history: history[j] ?? null,
          },
        ]),
      );
    if (!sol.ok || !dual) {
      const failure: SolveFailure = sol.ok ? { ok: false, reason: 'singular', items: f.committed.slice(), prices: sol.prices } : sol;
      issues.push(...failureIssues(failure, f, names, units, perHa, history));
      leftOut.push(f.spec.farm);
      return {
        farm: f.spec.farm,
        known: f.known,
        land: perHa ? f.land : null,
        evaluated: false,
        issues,
        outputs: emptyOutputs(),
        freeOutputs: {},
        inputs: {},
        unconditionalInputs,
        cost: null,
        inputSpending: null,
        elasticities: null,
        failedDrawShare: 1,
        belowZeroDrawShare: 0,
      };
    }
    // Point values (levels).
    const pStar = sol.prices;
    const yStar = sol.netputs;
    issues.push(...wrongSignIssues(f, names, roles, yStar));
    const isCommitted = new Array<boolean>(n).fill(false);
    for (const c of f.committed) isCommitted[c] = true;
    const freeIdx = names.map((_, i) => i).filter((i) => roles[i] === 'output' && !isCommitted[i]);
    const inputIdx = names.map((_, i) => i).filter((i) => roles[i] === 'input');
    const sets: ItemSets = { roles, isCommitted, inputIdx, freeIdx };
    // The general (Newton) solve of one draw's technology, started at the point's marginal costs.
    const solveGeneral = (theta: ArrayLike<number>, shift: ArrayLike<number>): SolveResult => {
      const start = f.prices.slice();
      f.committed.forEach((c) => (start[c] = pStar[c]!));
      return solveCommitted(technology(theta, f.z, shift), start, f.committed, f.target, { keepNonPositive: true });
    };

    // Welch–Satterthwaite stretch of every figure of this farm (and its share of the co-op's).
    // The solve used for the draws and the sensitivities: written out per form where it can be.
    const fast = options.generalSolve
      ? null
      : layout.form === 'normalized-quadratic'
        ? isCommitted[n - 1]
          ? null
          : nqDrawSolver(layout, f, pStar)
        : glDrawSolver(layout, f, pStar);
    const thetaBuf = new Float64Array(k);
    const shiftBuf = new Float64Array(n);
    const prBuf = new Float64Array(n);
    const yrBuf = new Float64Array(n);
    const stretchOf = welch
      ? farmStretches(f, welch, {
          sets,
          k,
          n,
          theta: fit.theta,
          Vf,
          Vs,
          Sl,
          solve: (theta, shift) => {
            if (fast) {
              thetaBuf.set(theta);
              shiftBuf.set(shift);
              const st = fast(thetaBuf, 0, shiftBuf, prBuf, yrBuf);
              return st === 'ok' || st === 'below-zero' ? { ok: true, prices: Array.from(prBuf), netputs: Array.from(yrBuf), iterations: 0 } : null;
            }
            const r = solveGeneral(theta, shift);
            return r.ok ? r : null;
          },
          coop: { Jt: coopJt!, Jl: coopJl!, noise: coopNoise, marginOf: (c) => f.spec.contractPrices?.[names[c]!] !== undefined },
        })
      : null;
    const stretch = (row: number): Stretch => (stretchOf ? stretchOf[row]! : NO_STRETCH);

    // Draws.
    const draws = new FarmFigures(f, sets, S);
    const ok = new Uint8Array(S);
    let failed = 0;
    let belowZero = 0;
    let beyond = 0;
    if (shared) {
      const shift = new Float64Array(n);
      const eta = new Float64Array(n);
      const pr = new Float64Array(n);
      const yr = new Float64Array(n);
      for (let s = 0; s < S; s++) {
        rng.fillNormals(eta);
        for (let i = 0; i < n; i++) shift[i] = f.mu[i]! + shared.lambda[s * n + i]! + f.noiseSd[i]! * eta[i]!;
        let status: DrawStatus;
        if (fast) status = fast(shared.theta, s * k, shift, pr, yr);
        else {
          const r = solveGeneral(shared.theta.subarray(s * k, (s + 1) * k), shift);
          if (r.ok) {
            pr.set(r.prices);
            yr.set(r.netputs);
            status = r.nonPositive?.length ? 'below-zero' : 'ok';
          } else if (r.reason === 'out-of-reach') status = r.direction === 'low' ? 'lost-below-zero' : 'lost-beyond';
          else status = 'failed';
        }
        if (status === 'failed' || status === 'lost-below-zero' || status === 'lost-beyond') {
          failed++;
          if (status === 'lost-below-zero') belowZero++;
          if (status === 'lost-beyond') beyond++;
          coopOk[s] = 0;
          continue;
        }
        if (status === 'below-zero') belowZero++;
        ok[s] = 1;
        draws.record(s, pr, yr);
        coopDraws.add(s, draws, s, contractPrices);
      }
    }
    const failedWord = failedDrawsIssue(f, names, S, failed, belowZero, beyond);
    if (failedWord) issues.push(failedWord);
    const band = (values: Float64Array, point: number, clip: boolean, st: Stretch): ContractedBand => summarise(values, ok, point, probs, level, clip, st);
    const m = f.committed.length;
    // The point's figures, by the same arithmetic as a draw's.
    const at = new FarmFigures(f, sets, 1);
    at.record(0, pStar, yStar);
    coopAtPoint.add(0, at, 0, contractPrices);

    const outputs: Record<string, ContractedOutputResult> = {};
    f.committed.forEach((c, j) => {
      const cp = contractPrices[j];
      const mcPoint = at.mc[j]![0]!;
      const marginValues = cp === undefined ? null : Float64Array.from(draws.mc[j]!, (v) => cp - v);
      outputs[names[c]!] = {
        quantity: f.quantity[j]!,
        perHectare: perHa ? f.target[j]! : null,
        marginalCost: band(draws.mc[j]!, mcPoint, false, stretch(j)),
        marginalCostSlope: dual.marginalCostSlope[j]![j]! / f.land,
        contractPrice: cp ?? null,
        margin: marginValues ? band(marginValues, cp! - mcPoint, false, stretch(j)) : null,
        history: history[j] ?? null,
      };
      coopPoint.qty[c]! += f.quantity[j]!;
      if (cp !== undefined) coopPoint.marginQty[c]! += f.quantity[j]!;
    });
    const inputs: Record<string, ContractedBand> = {};
    inputIdx.forEach((i, j) => (inputs[names[i]!] = band(draws.inputs[j]!, at.inputs[j]![0]!, true, stretch(m + i))));
    const freeOutputs: Record<string, ContractedBand> = {};
    freeIdx.forEach((i, j) => {
      freeOutputs[names[i]!] = band(draws.free[j]!, at.free[j]![0]!, true, stretch(m + i));
      coopPoint.freeAny[i] = true;
    });
    for (const i of inputIdx) coopPoint.unconditional[i]! += unconditionalInputs[names[i]!]!;
    const parts = elasticityParts(dual, pStar, yStar, f.committed, f.target, roles);
    coopElast.push({ farmX: inputIdx.map((_, j) => at.inputs[j]![0]!), farm: parts });
    return {
      farm: f.spec.farm,
      known: f.known,
      land: perHa ? f.land : null,
      evaluated: true,
      issues,
      outputs,
      freeOutputs,
      inputs,
      unconditionalInputs,
      cost: band(draws.cost, at.cost[0]!, false, stretch(m + n)),
      inputSpending: band(draws.spend, at.spend[0]!, false, stretch(m + n + 1)),
      elasticities: farmTables(parts, names),
      failedDrawShare: S > 0 ? failed / S : 0,
      belowZeroDrawShare: S > 0 ? belowZero / S : 0,
    };
  });

  // Co-op.
  progress(0.95, 'Co-op totals');
  const evaluatedCount = farms.filter((f) => f.evaluated).length;
  const coopStretch = (row: number): Stretch => {
    if (!welch) return NO_STRETCH;
    const jt = coopJt![row]!;
    const jl = coopJl![row]!;
    return welch.at(quadForm(Vf, jt) + coopNoise[row]!, quadForm(Vs, jt) + quadForm(Sl, jl));
  };
  const coopBand = (values: Float64Array, point: number, clip: boolean, row: number): ContractedBand => summarise(values, coopOk, point, probs, level, clip, coopStretch(row));
  const coop: ContractedCoopResult = {
    quantities: {},
    marginalCost: {},
    margin: {},
    freeOutputs: {},
    inputs: {},
    unconditionalInputs: {},
    cost: coopBand(coopDraws.cost, coopAtPoint.cost[0]!, false, 3 * n),
    inputSpending: coopBand(coopDraws.spend, coopAtPoint.spend[0]!, false, 3 * n + 1),
    elasticities: null,
    farmsEvaluated: evaluatedCount,
    farmsLeftOut: leftOut,
  };
  names.forEach((nm, i) => {
    if (roles[i] === 'input') {
      coop.inputs[nm] = coopBand(coopDraws.inputs[i]!, coopAtPoint.inputs[i]![0]!, true, 2 * n + i);
      coop.unconditionalInputs[nm] = coopPoint.unconditional[i]!;
    }
    if (anyCommitted[i] && coopPoint.qty[i]! > 0) {
      const Q = coopPoint.qty[i]!;
      coop.quantities[nm] = Q;
      coop.marginalCost[nm] = coopBand(Float64Array.from(coopDraws.mcNum[i]!, (v) => v / Q), coopAtPoint.mcNum[i]![0]! / Q, false, i);
      // the margin: tonnage-weighted over the farms that gave a contract price
      const MQ = coopPoint.marginQty[i]!;
      if (MQ > 0) coop.margin[nm] = coopBand(Float64Array.from(coopDraws.marginNum[i]!, (v) => v / MQ), coopAtPoint.marginNum[i]![0]! / MQ, false, n + i);
    }
    if (roles[i] === 'output' && coopPoint.freeAny[i]) coop.freeOutputs[nm] = coopBand(coopDraws.free[i]!, coopAtPoint.free[i]![0]!, true, 2 * n + i);
  });
  coop.elasticities = coopTables(coopElast, names, roles, anyCommitted);

  const allSame = setups.every((f) => f.prices.every((v, i) => v === setups[0]!.prices[i] || anyCommitted[i]));
  return {
    ...projectionHeader(model, season, { draws: S, seed, level }),
    committedOutputs,
    prices: allSame ? Object.fromEntries(names.map((nm, i) => [nm, setups[0]!.prices[i]!]).filter(([nm]) => !committedOutputs.includes(nm as string))) : null,
    farms,
    coop,
    curvatureViolationShare: shared ? shared.curvatureViolations / S : 0,
    notes: [
      'Marginal cost: the price of a committed output at which the fitted technology would supply exactly the committed quantity (the envelope theorem: the extra cost of one more unit).',
      'Conditional input demand: the input use that produces the committed quantities at least cost at the stated input prices (Shephard’s lemma); outputs not committed respond to their own prices as in the outlook.',
      'Cost: spending on the modelled variable inputs less the revenue of outputs not committed; fixed costs (land, machinery) are not in it.',
      `Bands: the central ${Math.round(level * 100)} % of ${S} draws of the model’s uncertainty (parameters, the season shock shared by all farms, each farm’s own level and residual); co-op marginal costs and margins are tonnage-weighted means over farms.`,
    ],
    caution: CONTRACTED_CAUTION,
  };
}

// ---------------------------------------------------------------------------------------------
// Elasticities

interface FarmElasticityParts {
  /** Inputs (item indices) and the priced rest items (inputs and free outputs). */
  inputs: number[];
  rest: number[];
  conditional: number[][];
  unconditional: number[][];
  committed: number[];
  output: number[][];
}

function elasticityParts(dual: DualPoint, p: number[], y: number[], committed: number[], target: number[], roles: readonly string[]): FarmElasticityParts {
  const rest = dual.rest;
  const inputs = rest.filter((i) => roles[i] === 'input');
  const row = (i: number) => rest.indexOf(i);
  const conditional = inputs.map((i) => rest.map((l, cl) => (dual.conditional[row(i)]![cl]! * p[l]!) / y[i]!));
  const unconditional = inputs.map((i) => rest.map((l, cl) => (dual.unconditional[row(i)]![cl]! * p[l]!) / y[i]!));
  const output = inputs.map((i) => committed.map((_, k) => (dual.restPerCommitted[row(i)]![k]! * target[k]!) / y[i]!));
  return { inputs, rest, conditional, unconditional, committed, output };
}

function farmTables(parts: FarmElasticityParts, names: string[]): ContractedElasticities {
  const rows = parts.inputs.map((i) => names[i]!);
  const cols = parts.rest.map((i) => names[i]!);
  return {
    conditional: { rows, columns: cols, values: parts.conditional },
    unconditional: { rows, columns: cols, values: parts.unconditional },
    output: { rows, columns: parts.committed.map((i) => names[i]!), values: parts.output },
  };
}

/** Co-op elasticities: each farm's weighted by its share of the co-op's quantity of the input (columns: input prices, committed outputs). */
function coopTables(farms: { farmX: number[]; farm: FarmElasticityParts }[], names: string[], roles: readonly string[], anyCommitted: boolean[]): ContractedElasticities | null {
  if (!farms.length) return null;
  const inputs = names.map((_, i) => i).filter((i) => roles[i] === 'input');
  const outs = names.map((_, i) => i).filter((i) => anyCommitted[i]);
  const table = (pick: (p: FarmElasticityParts) => number[][], colsOf: (p: FarmElasticityParts) => number[], cols: number[]): ElasticityTable => {
    const values = inputs.map((i, r) => {
      let X = 0;
      const acc = new Array<number>(cols.length).fill(0);
      for (const { farmX, farm } of farms) {
        const x = farmX[r]!;
        const fr = farm.inputs.indexOf(i);
        if (fr < 0 || !(x > 0)) continue;
        X += x;
        const fc = colsOf(farm);
        cols.forEach((l, c) => {
          const at = fc.indexOf(l);
          if (at >= 0) acc[c]! += x * pick(farm)[fr]![at]!;
        });
      }
      return acc.map((v) => (X > 0 ? v / X : NaN));
    });
    return { rows: inputs.map((i) => names[i]!), columns: cols.map((i) => names[i]!), values };
  };
  return {
    conditional: table((p) => p.conditional, (p) => p.rest, inputs),
    unconditional: table((p) => p.unconditional, (p) => p.rest, inputs),
    output: table((p) => p.output, (p) => p.committed, outs),
  };
}

