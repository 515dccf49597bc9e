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
import { dualAt, solveCommitted, type DualPoint, type SolveFailure, type SolveSuccess, type Technology } from './contracted-core.js';
import { EstimationInputError } from './errors.js';
import { NO_STRETCH, WelchTable, type Stretch } from './forecast.js';
import { drawSharedParts, type SharedDraws } from './forecast-draws.js';
import { formOf } from './forms.js';
import { netputsFromDecomposition } from './model.js';
import { glIndex } from './gl.js';
import { nqIndex } from './nq.js';
import type { ForecastModel } from './panel.js';
import { PROJECTION_CAUTION } from './projection.js';
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

/** Share of failed draws above which a farm gets a (non-blocking) word about its bands. */
const FAILED_DRAWS_WORTH_SAYING = 0.05;

export const CONTRACTED_CAUTION =
  'Marginal costs and conditional input needs are estimates from the fitted profit function, conditional on the stated input prices and on past relationships; they are not financial advice or a recommendation to sign, price or hedge a contract. Fertiliser rates follow soil tests, local guidance and nutrient-management rules; a certified adviser has the last word.';

interface FarmSetup {
  spec: ContractedFarmSpec;
  prices: number[];
  /** Fixed factors as the profit function takes them (per hectare for the per-hectare model, trend included). */
  z: number[];
  land: number;
  known: boolean;
  /** Own level μ_f per item (0 for the pooled model or a new farm). */
  mu: number[];
  /** Standard deviation of the farm-level shift per item (own-level uncertainty + residual). */
  noiseSd: number[];
  committed: number[];
  /** Committed quantities in levels and per hectare (per farm for the pooled model). */
  quantity: number[];
  target: number[];
}

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
  const S = options.draws ?? 2000;
  const seed = options.seed ?? 1;
  const level = options.level ?? 0.9;
  if (!(Number.isInteger(S) && (S === 0 || S >= 100))) throw new EstimationInputError(`draws must be 0 (the point only) or a whole number of at least 100, got ${S}`);
  if (!(level > 0 && level < 1)) throw new EstimationInputError(`level must lie between 0 and 1, got ${level}`);
  if (!options.farms.length) throw new EstimationInputError('the contracted evaluation needs at least one farm');
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

  // Co-op accumulators per draw (NaN once any evaluated farm fails in that draw).
  const coopInputs = names.map(() => new Float64Array(S));
  const coopFree = names.map(() => new Float64Array(S));
  const coopCost = new Float64Array(S);
  const coopSpend = new Float64Array(S);
  const coopMcNum = names.map(() => new Float64Array(S));
  const coopMarginNum = names.map(() => new Float64Array(S));
  const coopOk = new Uint8Array(S).fill(1);
  const coopPoint = {
    inputs: new Array<number>(n).fill(0),
    free: new Array<number>(n).fill(0),
    freeAny: new Array<boolean>(n).fill(false),
    cost: 0,
    spend: 0,
    qty: new Array<number>(n).fill(0),
    mcNum: new Array<number>(n).fill(0),
    marginQty: new Array<number>(n).fill(0),
    marginNum: new Array<number>(n).fill(0),
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
    // Words on commitments beyond the farm's own record.
    f.committed.forEach((c, j) => {
      const h = history[j];
      if (!h) return;
      const t = f.target[j]!;
      const what = unitPer(units[names[c]!], perHa);
      if (t > h.max * (1 + 1e-9))
        issues.push({
          item: names[c]!,
          kind: 'beyond-history',
          blocking: false,
          text: `${fmtQty(f.quantity[j]!, units[names[c]!])} of ${names[c]} is ${fmt(t)} ${what}: more ${names[c]} ${perHa ? 'per hectare ' : ''}than farm ${f.spec.farm} has grown in any of its ${h.seasons} recorded season${h.seasons === 1 ? '' : 's'} (at most ${fmt(h.max)} ${what}), so the figures extrapolate the fitted technology.`,
        });
      else if (t < h.min * (1 - 1e-9))
        issues.push({
          item: names[c]!,
          kind: 'beyond-history',
          blocking: false,
          text: `${fmtQty(f.quantity[j]!, units[names[c]!])} of ${names[c]} is ${fmt(t)} ${what}: less ${names[c]} ${perHa ? 'per hectare ' : ''}than farm ${f.spec.farm} has grown in any of its ${h.seasons} recorded season${h.seasons === 1 ? '' : 's'} (at least ${fmt(h.min)} ${what}), so the figures extrapolate the fitted technology.`,
        });
    });

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
            contractPrice: f.spec.contractPrices?.[names[c]!] ?? null,
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
    names.forEach((nm, i) => {
      if (roles[i] === 'input' && yStar[i]! > 0)
        issues.push({
          item: nm,
          kind: 'wrong-sign',
          blocking: false,
          text: `At the committed tonnage the fitted technology gives farm ${f.spec.farm} a negative use of ${nm} (${fmt(-f.land * yStar[i]!)}); it is shown as zero, and the other figures should be read with care.`,
        });
    });
    const isCommitted = new Array<boolean>(n).fill(false);
    for (const c of f.committed) isCommitted[c] = true;
    const freeIdx = names.map((_, i) => i).filter((i) => roles[i] === 'output' && !isCommitted[i]);
    const inputIdx = names.map((_, i) => i).filter((i) => roles[i] === 'input');

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
          roles,
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
            const start = f.prices.slice();
            f.committed.forEach((c) => (start[c] = pStar[c]!));
            const r = solveCommitted(technology(theta, f.z, shift), start, f.committed, f.target, { keepNonPositive: true });
            return r.ok ? r : null;
          },
          coop: { Jt: coopJt!, Jl: coopJl!, noise: coopNoise, marginOf: (c) => f.spec.contractPrices?.[names[c]!] !== undefined },
        })
      : null;
    const stretch = (row: number): Stretch => (stretchOf ? stretchOf[row]! : NO_STRETCH);

    // Draws.
    const mc = f.committed.map(() => new Float64Array(S));
    const inputsD = inputIdx.map(() => new Float64Array(S));
    const freeD = freeIdx.map(() => new Float64Array(S));
    const costD = new Float64Array(S);
    const spendD = new Float64Array(S);
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
          const theta = shared.theta.subarray(s * k, (s + 1) * k);
          const start = f.prices.slice();
          f.committed.forEach((c) => (start[c] = pStar[c]!));
          const r = solveCommitted(technology(theta, f.z, shift), start, f.committed, f.target, { keepNonPositive: true });
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
        f.committed.forEach((c, j) => (mc[j]![s] = pr[c]!));
        inputIdx.forEach((i, j) => (inputsD[j]![s] = Math.max(0, -f.land * yr[i]!)));
        freeIdx.forEach((i, j) => (freeD[j]![s] = Math.max(0, f.land * yr[i]!)));
        let cost = 0;
        let spend = 0;
        for (let i = 0; i < n; i++) {
          if (!isCommitted[i]) cost -= pr[i]! * yr[i]!;
          if (roles[i] === 'input') spend -= pr[i]! * yr[i]!;
        }
        costD[s] = f.land * cost;
        spendD[s] = f.land * spend;
        // co-op sums within the draw
        for (let j = 0; j < inputIdx.length; j++) coopInputs[inputIdx[j]!]![s]! += inputsD[j]![s]!;
        for (let j = 0; j < freeIdx.length; j++) coopFree[freeIdx[j]!]![s]! += freeD[j]![s]!;
        coopCost[s]! += costD[s]!;
        coopSpend[s]! += spendD[s]!;
        f.committed.forEach((c, j) => {
          coopMcNum[c]![s]! += f.quantity[j]! * pr[c]!;
          const cp = f.spec.contractPrices?.[names[c]!];
          if (cp !== undefined) coopMarginNum[c]![s]! += f.quantity[j]! * (cp - pr[c]!);
        });
      }
    }
    if (S > 0 && failed / S > FAILED_DRAWS_WORTH_SAYING) {
      const what =
        beyond >= failed / 2
          ? 'the committed quantity is more than the technology of that draw can supply at any price'
          : belowZero >= failed / 2
            ? 'the committed quantity needs a price at or below zero'
            : 'the committed quantity could not be evaluated';
      issues.push({
        item: names[f.committed[0]!]!,
        kind: 'out-of-reach',
        blocking: false,
        text: `In ${Math.round((100 * failed) / S)} % of the ${S} draws of the model's uncertainty ${what} on farm ${f.spec.farm}; the bands cover the other draws only, so read them with care.`,
      });
    }
    const band = (values: Float64Array, point: number, clip: boolean, st: Stretch): ContractedBand => summarise(values, ok, point, probs, level, clip, st);
    const m = f.committed.length;

    const outputs: Record<string, ContractedOutputResult> = {};
    f.committed.forEach((c, j) => {
      const cp = f.spec.contractPrices?.[names[c]!];
      const marginValues = cp === undefined ? null : Float64Array.from(mc[j]!, (v) => cp - v);
      outputs[names[c]!] = {
        quantity: f.quantity[j]!,
        perHectare: perHa ? f.target[j]! : null,
        marginalCost: band(mc[j]!, pStar[c]!, false, stretch(j)),
        marginalCostSlope: dual.marginalCostSlope[j]![j]! / f.land,
        contractPrice: cp ?? null,
        margin: marginValues ? band(marginValues, cp! - pStar[c]!, false, stretch(j)) : null,
        history: history[j] ?? null,
      };
      coopPoint.qty[c]! += f.quantity[j]!;
      coopPoint.mcNum[c]! += f.quantity[j]! * pStar[c]!;
      if (cp !== undefined) {
        coopPoint.marginQty[c]! += f.quantity[j]!;
        coopPoint.marginNum[c]! += f.quantity[j]! * (cp - pStar[c]!);
      }
    });
    const inputs: Record<string, ContractedBand> = {};
    inputIdx.forEach((i, j) => {
      const x = Math.max(0, -f.land * yStar[i]!);
      inputs[names[i]!] = band(inputsD[j]!, x, true, stretch(m + i));
      coopPoint.inputs[i]! += x;
    });
    const freeOutputs: Record<string, ContractedBand> = {};
    freeIdx.forEach((i, j) => {
      const q = Math.max(0, f.land * yStar[i]!);
      freeOutputs[names[i]!] = band(freeD[j]!, q, true, stretch(m + i));
      coopPoint.free[i]! += q;
      coopPoint.freeAny[i] = true;
    });
    for (const i of inputIdx) coopPoint.unconditional[i]! += unconditionalInputs[names[i]!]!;
    coopPoint.cost += f.land * dual.cost;
    coopPoint.spend += f.land * dual.inputSpending;
    const parts = elasticityParts(dual, pStar, yStar, f.committed, f.target, roles);
    coopElast.push({ farmX: inputIdx.map((i) => Math.max(0, -f.land * yStar[i]!)), farm: parts });
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
      cost: band(costD, f.land * dual.cost, false, stretch(m + n)),
      inputSpending: band(spendD, f.land * dual.inputSpending, false, stretch(m + n + 1)),
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
    cost: coopBand(coopCost, coopPoint.cost, false, 3 * n),
    inputSpending: coopBand(coopSpend, coopPoint.spend, false, 3 * n + 1),
    elasticities: null,
    farmsEvaluated: evaluatedCount,
    farmsLeftOut: leftOut,
  };
  names.forEach((nm, i) => {
    if (roles[i] === 'input') {
      coop.inputs[nm] = coopBand(coopInputs[i]!, coopPoint.inputs[i]!, true, 2 * n + i);
      coop.unconditionalInputs[nm] = coopPoint.unconditional[i]!;
    }
    if (anyCommitted[i] && coopPoint.qty[i]! > 0) {
      const Q = coopPoint.qty[i]!;
      coop.quantities[nm] = Q;
      coop.marginalCost[nm] = coopBand(Float64Array.from(coopMcNum[i]!, (v) => v / Q), coopPoint.mcNum[i]! / Q, false, i);
      // the margin: tonnage-weighted over the farms that gave a contract price
      const MQ = coopPoint.marginQty[i]!;
      if (MQ > 0) coop.margin[nm] = coopBand(Float64Array.from(coopMarginNum[i]!, (v) => v / MQ), coopPoint.marginNum[i]! / MQ, false, n + i);
    }
    if (roles[i] === 'output' && coopPoint.freeAny[i]) coop.freeOutputs[nm] = coopBand(coopFree[i]!, coopPoint.free[i]!, true, 2 * n + i);
  });
  coop.elasticities = coopTables(coopElast, names, roles, anyCommitted);

  const allSame = setups.every((f) => f.prices.every((v, i) => v === setups[0]!.prices[i] || anyCommitted[i]));
  return {
    spec: model.spec,
    season,
    level,
    draws: S,
    seed,
    items: layout.items.map((it) => ({ name: it.name, role: it.role })),
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
// The normalized quadratic's linear solve, per draw

/**
 * 'ok'; 'below-zero': solved, but a committed output needs a price at or below zero (kept: the
 * linear solution is exact, and a negative marginal cost says the farm would grow more than committed
 * even at a zero price); 'lost-below-zero' / 'lost-beyond': not solved because no positive price reaches the
 * quantity (general solve only); 'failed': singular or not settled.
 */
type DrawStatus = 'ok' | 'below-zero' | 'lost-below-zero' | 'lost-beyond' | 'failed';

/**
 * For the NQ with the numeraire not committed: B_cc p̃*_c = y*_c/L − μ_c − λ_c − u_c − a_c − B_cr p̃_r − C_c z,
 * then every netput from the NQ equations. No allocation per draw.
 */
function nqDrawSolver(layout: ForecastModel['fit']['layout'], f: FarmSetup, pointPrices: number[]) {
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
    // scaled Cholesky in place (lower triangle), then the two triangular solves
    let maxDiag = 0;
    for (let a = 0; a < mc; a++) maxDiag = Math.max(maxDiag, Math.abs(A[a * mc + a]!));
    if (!(maxDiag > 0)) return 'failed';
    for (let a = 0; a < mc; a++)
      for (let b = 0; b <= a; b++) {
        let v = A[a * mc + b]!;
        for (let l = 0; l < b; l++) v -= A[a * mc + l]! * A[b * mc + l]!;
        if (a === b) {
          if (!(v > 1e-10 * maxDiag)) return 'failed';
          A[a * mc + a] = Math.sqrt(v);
        } else A[a * mc + b] = v / A[b * mc + b]!;
      }
    for (let a = 0; a < mc; a++) {
      let v = rhs[a]!;
      for (let l = 0; l < a; l++) v -= A[a * mc + l]! * rhs[l]!;
      rhs[a] = v / A[a * mc + a]!;
    }
    for (let a = mc - 1; a >= 0; a--) {
      let v = rhs[a]!;
      for (let l = a + 1; l < mc; l++) v -= A[l * mc + a]! * rhs[l]!;
      rhs[a] = v / A[a * mc + a]!;
    }
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
 * For the generalized Leontief: Newton's method on the committed prices as in solveCommitted
 * (contracted-core.ts: the same safeguards, tolerance and verdicts), with the netputs
 *   y_i = b_ii + Σ_{j≠i} b_ij √(p_j/p_i) + Σ_k c_ik z_k + ½ Σ_kl g_ikl z_k z_l + shift_i
 * and their price Hessian written out, so that a draw allocates nothing.
 */
function glDrawSolver(layout: ForecastModel['fit']['layout'], f: FarmSetup, pointPrices: number[]) {
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
      let maxDiag = 0;
      for (let a = 0; a < mc; a++) maxDiag = Math.max(maxDiag, Math.abs(A[a * mc + a]!));
      if (!(maxDiag > 0)) return 'failed';
      for (let a = 0; a < mc; a++)
        for (let b = 0; b <= a; b++) {
          let v = A[a * mc + b]!;
          for (let l = 0; l < b; l++) v -= A[a * mc + l]! * A[b * mc + l]!;
          if (a === b) {
            if (!(v > 1e-10 * maxDiag)) return 'failed';
            A[a * mc + a] = Math.sqrt(v);
          } else A[a * mc + b] = v / A[b * mc + b]!;
        }
      for (let a = 0; a < mc; a++) {
        let v = r[a]! * p[C[a]!]!;
        for (let l = 0; l < a; l++) v -= A[a * mc + l]! * d[l]!;
        d[a] = v / A[a * mc + a]!;
      }
      for (let a = mc - 1; a >= 0; a--) {
        let v = d[a]!;
        for (let l = a + 1; l < mc; l++) v -= A[l * mc + a]! * d[l]!;
        d[a] = v / A[a * mc + a]!;
      }
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

// ---------------------------------------------------------------------------------------------
// Set-up and validation

function setUp(model: ForecastModel, options: ContractedOptions, season: number): FarmSetup[] {
  const { fit } = model;
  const { layout } = fit;
  const n = layout.items.length;
  const perHa = model.spec === 'per-hectare';
  const itemIndex = new Map(layout.items.map((it, i) => [it.name, i]));
  const trendIdx = layout.trendOrigin !== null ? layout.factors.indexOf('trend') : -1;
  const common = fit.means.prices.slice();
  for (const [name, v] of Object.entries(options.prices ?? {})) {
    const i = itemIndex.get(name);
    if (i === undefined) throw new EstimationInputError(`prices: "${name}" is not an item of the model (items: ${[...itemIndex.keys()].join(', ')})`);
    if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`prices: the price of ${name} must be a positive number, got ${v}`);
    common[i] = v;
  }
  const landName = model.landFactor;
  const fx = model.farmEffects;
  const farmPos = new Map((fx?.farms ?? []).map((f, i) => [f, i]));
  const scale = model.errorScale;
  const seen = new Set<string>();
  return options.farms.map((spec) => {
    const where = `farm ${spec.farm}`;
    if (typeof spec.farm !== 'string' || !spec.farm) throw new EstimationInputError('every farm needs a name');
    if (seen.has(spec.farm)) throw new EstimationInputError(`${where} is listed twice`);
    seen.add(spec.farm);
    const prices = common.slice();
    for (const [name, v] of Object.entries(spec.prices ?? {})) {
      const i = itemIndex.get(name);
      if (i === undefined) throw new EstimationInputError(`${where}: "${name}" is not an item of the model`);
      if (!(Number.isFinite(v) && v > 0)) throw new EstimationInputError(`${where}: the price of ${name} must be a positive number, got ${v}`);
      prices[i] = v;
    }
    const fixed = spec.fixed ?? {};
    for (const name of Object.keys(fixed))
      if (name !== landName && !layout.factors.includes(name)) throw new EstimationInputError(`${where}: "${name}" is not a fixed factor of the model`);
    let land = 1;
    if (perHa) {
      const L = fixed[landName!];
      if (L === undefined || !(Number.isFinite(L) && L > 0)) throw new EstimationInputError(`${where}: land (${landName}) must be given and more than 0 ha`);
      land = L;
    }
    const z = layout.factors.map((name, kk) => {
      if (kk === trendIdx && fixed[name] === undefined) return season - layout.trendOrigin! + 1;
      const v = fixed[name];
      if (v === undefined || !Number.isFinite(v)) throw new EstimationInputError(`${where}: fixed factor "${name}" is missing or not a number`);
      return perHa && kk !== trendIdx ? v / land : v;
    });
    const committed: number[] = [];
    const quantity: number[] = [];
    const entries = Object.entries(spec.contracted ?? {});
    for (const [name, q] of entries) {
      const i = itemIndex.get(name);
      if (i === undefined) throw new EstimationInputError(`${where}: committed item "${name}" is not an item of the model`);
      if (layout.items[i]!.role !== 'output') throw new EstimationInputError(`${where}: ${name} is an input; only outputs can be committed`);
      if (!(Number.isFinite(q) && q > 0)) throw new EstimationInputError(`${where}: the committed quantity of ${name} must be a number above 0, got ${q}`);
      committed.push(i);
      quantity.push(q);
    }
    // item order
    const order = committed.map((_, j) => j).sort((a, b) => committed[a]! - committed[b]!);
    const c = order.map((j) => committed[j]!);
    const qs = order.map((j) => quantity[j]!);
    for (const [name, v] of Object.entries(spec.contractPrices ?? {})) {
      if (!(spec.contracted ?? {})[name]) throw new EstimationInputError(`${where}: a contract price is given for ${name}, which the farm has not committed`);
      if (!(Number.isFinite(v) && v >= 0)) throw new EstimationInputError(`${where}: the contract price of ${name} must be a number of at least 0, got ${v}`);
    }
    for (const [name, v] of Object.entries(spec.history ?? {})) {
      if (!itemIndex.has(name)) throw new EstimationInputError(`${where}: history for "${name}", which is not an item of the model`);
      if (!Array.isArray(v) || v.some((x) => !(Number.isFinite(x) && x >= 0))) throw new EstimationInputError(`${where}: the history of ${name} must be a list of quantities of at least 0`);
    }
    const pos = farmPos.get(spec.farm);
    const mu = new Array<number>(n).fill(0);
    const noiseSd = new Array<number>(n).fill(0);
    for (let i = 0; i < n; i++) {
      let varFarm = 0;
      if (perHa && fx) {
        if (pos !== undefined) {
          mu[i] = fx.effects[i]![pos]!;
          varFarm = fx.variance[i]![pos]!;
        } else varFarm = fx.tau2[i]!;
      }
      const resVar = perHa && scale ? scale.variance[i]! * Math.exp(scale.exponent[i]! * Math.log(land / scale.referenceLand)) : fit.sigma[i]![i]!;
      noiseSd[i] = Math.sqrt(Math.max(varFarm + resVar, 0));
    }
    return { spec, prices, z, land, known: pos !== undefined, mu, noiseSd, committed: c, quantity: qs, target: qs.map((q) => q / land) };
  });
}

function historyOf(spec: ContractedFarmSpec, item: string): { min: number; max: number; seasons: number } | null {
  const h = spec.history?.[item];
  if (!h || !h.length) return null;
  return { min: Math.min(...h), max: Math.max(...h), seasons: h.length };
}

// ---------------------------------------------------------------------------------------------
// Words

function fmt(v: number): string {
  const a = Math.abs(v);
  const digits = a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : 3;
  return v.toLocaleString('en-GB', { maximumFractionDigits: digits, minimumFractionDigits: 0 });
}

function fmtQty(q: number, unit: string | undefined): string {
  return unit ? `${fmt(q)} ${unit}` : fmt(q);
}

function unitPer(unit: string | undefined, perHa: boolean): string {
  if (!perHa) return unit ? `${unit} for the farm` : 'for the farm';
  return unit ? `${unit}/ha` : 'per hectare';
}

function failureIssues(
  failure: SolveFailure,
  f: FarmSetup,
  names: string[],
  units: Record<string, string>,
  perHa: boolean,
  history: ({ min: number; max: number; seasons: number } | null)[],
): ContractedIssue[] {
  const others = f.committed.length > 1;
  return failure.items.map((c) => {
    const j = f.committed.indexOf(c);
    const item = names[c]!;
    const qty = `${fmtQty(f.quantity[j]!, units[item])} of ${item}${perHa ? ` (${fmt(f.target[j]!)} ${unitPer(units[item], true)})` : ''}`;
    const h = history[j];
    const given = others ? ', together with its other commitments' : '';
    if (failure.reason === 'out-of-reach' && failure.direction === 'low') {
      const hist = h && f.target[j]! < h.min ? ` It is also less ${item} ${perHa ? 'per hectare ' : ''}than the farm has grown in any of its ${h.seasons} recorded seasons (at least ${fmt(h.min)} ${unitPer(units[item], perHa)}).` : '';
      return {
        item,
        kind: 'out-of-reach' as const,
        blocking: true,
        text: `${qty} is out of reach for farm ${f.spec.farm} at positive prices: the fitted technology would grow more ${item} than that even at a price near zero${given}, so no marginal cost can be given.${hist}`,
      };
    }
    if (failure.reason === 'out-of-reach') {
      const hist = h && f.target[j]! > h.max ? ` That is more ${item} ${perHa ? 'per hectare ' : ''}than this farm has ever grown (at most ${fmt(h.max)} ${unitPer(units[item], perHa)} in ${h.seasons} recorded season${h.seasons === 1 ? '' : 's'}).` : '';
      return {
        item,
        kind: 'out-of-reach' as const,
        blocking: true,
        text: `${qty} is more than the fitted technology can supply on farm ${f.spec.farm} at any price${given}, so no marginal cost can be given.${hist}`,
      };
    }
    if (failure.reason === 'singular')
      return {
        item,
        kind: 'singular' as const,
        blocking: true,
        text: `The fitted supply of ${item} on farm ${f.spec.farm} does not respond to its own price${others ? ' independently of the other committed outputs' : ''} (the profit function is flat in that direction), so no price brings it to ${qty} and no marginal cost can be read from it.`,
      };
    return {
      item,
      kind: 'no-solution' as const,
      blocking: true,
      text: `The search for the price at which farm ${f.spec.farm} would supply ${qty} did not settle, so no marginal cost is given.`,
    };
  });
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

// ---------------------------------------------------------------------------------------------
// Summaries

/**
 * Point and predictive summary over the draws marked ok: deviations of the quantiles from the median
 * stretched by the figure's Welch–Satterthwaite t (as the projection's), the SD by its factor, and
 * the band widened to hold the point.
 */
function summarise(values: Float64Array, ok: Uint8Array, point: number, probs: number[], level: number, clip: boolean, stretch: Stretch): ContractedBand {
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
function quadForm(V: number[][] | null, x: ArrayLike<number>): number {
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

interface StretchContext {
  roles: readonly ('output' | 'input')[];
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
function farmStretches(f: FarmSetup, welch: WelchTable, cx: StretchContext): Stretch[] {
  const { k, n } = cx;
  const m = f.committed.length;
  const R = m + n + 2;
  const isC = new Set(f.committed);
  const figures = (sol: SolveSuccess): number[] => {
    let cost = 0;
    let spend = 0;
    for (let i = 0; i < n; i++) {
      if (!isC.has(i)) cost -= sol.prices[i]! * sol.netputs[i]!;
      if (cx.roles[i] === 'input') spend -= sol.prices[i]! * sol.netputs[i]!;
    }
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
