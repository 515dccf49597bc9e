/**
 * The fit command's committed-output section (docs/fit-command.md §5, docs/cost-duality.md):
 *   --committed item=quantity,...   one commitment at the evaluation point (its prices, fixed factors, land)
 *   --committed-file FILE.csv       one row per farm: farm, committed:<item>, optional contract-price:<item>,
 *                                   price:<item>, fixed:<name> (missing or empty: the evaluation point's)
 *   --draws N (default 1000; 0: the point only), --seed N (default 1), --level P (default 0.9)
 * The result is the engine's ContractedEvaluation, added to the fit document under `committed`.
 */
import type { ContractedEvaluation, ContractedFarmSpec } from '../../shared/contracted-types.js';
import { evaluateContracted } from './contracted.js';
import { numberCell } from './dataset.js';
import { EstimationInputError } from './errors.js';
import { farmRows, readFarmFile } from './farm-file.js';
import type { FitResult } from './fit.js';
import type { ForecastModel } from './panel.js';

/** The name of the single farm of `--committed`. */
export const EVALUATION_POINT_FARM = 'evaluation point';

/** The pooled forecasting model of a fitted profit function (levels; parameter uncertainty only), as fitForecastModel's pooled branch builds it. */
export function pooledModelOf(fit: FitResult, landFactor: string | null): ForecastModel {
  const k = fit.theta.length;
  return {
    spec: 'pooled',
    specification: 'profit function in levels, one technology and one error variance for every farm',
    fit,
    landFactor,
    parameterCovariance: { idiosyncratic: fit.covariance, season: Array.from({ length: k }, () => new Array<number>(k).fill(0)) },
    farmEffects: null,
    seasonEffects: null,
    errorScale: null,
    seasons: { labels: [String(fit.seasonYears.first), String(fit.seasonYears.last)], years: [fit.seasonYears.first, fit.seasonYears.last] },
    outerIterations: 0,
  };
}

/**
 * Parse the committed-output file against the model.
 * @throws EstimationInputError naming the row and column
 */
export function parseCommittedCsv(text: string, model: ForecastModel, point: { prices: Record<string, number>; fixed: Record<string, number> }): ContractedFarmSpec[] {
  const { layout } = model.fit;
  const items = new Map(layout.items.map((it) => [it.name, it.role]));
  const factorNames = Object.keys(point.fixed);
  const file = readFarmFile(text, (h) => {
    const m = /^(committed|contract-price|price|fixed):(.+)$/.exec(h);
    if (m && (m[1] === 'committed' || m[1] === 'contract-price') && items.has(m[2]!) && items.get(m[2]!) !== 'output')
      throw new EstimationInputError(`row 1, column ${h}: ${m[2]} is an input; only outputs can be committed`, { row: 1, column: h });
    const ok =
      h === 'farm' ||
      (m && (m[1] === 'committed' || m[1] === 'contract-price' || m[1] === 'price') && items.has(m[2]!)) ||
      (m && m[1] === 'fixed' && factorNames.includes(m[2]!));
    if (!ok)
      throw new EstimationInputError(
        `row 1, column ${h}: unknown column (expected farm, committed:<output>, contract-price:<output>, price:<item>, fixed:<name> for an item or fixed factor of the model)`,
        { row: 1, column: h },
      );
  });
  const { header, col } = file;
  if (!col.has('farm')) throw new EstimationInputError('row 1: the required column "farm" is missing', { row: 1, column: 'farm' });
  const committedCols = header.filter((h) => h.startsWith('committed:'));
  if (!committedCols.length) throw new EstimationInputError('row 1: the file needs at least one committed:<output> column', { row: 1 });
  for (const h of header)
    if (h.startsWith('contract-price:') && !col.has(`committed:${h.slice('contract-price:'.length)}`))
      throw new EstimationInputError(`row 1, column ${h}: a contract price without its committed:${h.slice('contract-price:'.length)} column`, { row: 1, column: h });
  const farms: ContractedFarmSpec[] = [];
  for (const { row, cells, farm } of farmRows(file)) {
    const cell = (h: string): string => cells[col.get(h)!]!.trim();
    const contracted: Record<string, number> = {};
    const contractPrices: Record<string, number> = {};
    for (const h of committedCols) {
      if (cell(h) === '') continue;
      const item = h.slice('committed:'.length);
      const v = numberCell(cell(h), row, h);
      if (!(v > 0)) throw new EstimationInputError(`row ${row}, column ${h}: a committed quantity must be more than 0 (leave the cell empty for an output not committed), got ${v}`, { row, column: h });
      contracted[item] = v;
      const ph = `contract-price:${item}`;
      if (col.has(ph) && cell(ph) !== '') {
        const p = numberCell(cell(ph), row, ph);
        if (!(p >= 0)) throw new EstimationInputError(`row ${row}, column ${ph}: a contract price must be at least 0, got ${p}`, { row, column: ph });
        contractPrices[item] = p;
      }
    }
    for (const h of header)
      if (h.startsWith('contract-price:') && cell(h) !== '' && contracted[h.slice('contract-price:'.length)] === undefined)
        throw new EstimationInputError(`row ${row}, column ${h}: a contract price for an output this farm does not commit`, { row, column: h });
    if (!Object.keys(contracted).length) throw new EstimationInputError(`row ${row}: farm "${farm}" commits no output (fill at least one committed:<output> cell)`, { row });
    const prices = { ...point.prices };
    const fixed = { ...point.fixed };
    for (const h of header) {
      const m = /^(price|fixed):(.+)$/.exec(h);
      if (!m || cell(h) === '') continue;
      const v = numberCell(cell(h), row, h);
      if (m[1] === 'price' && !(v > 0)) throw new EstimationInputError(`row ${row}, column ${h}: a price must be positive, got ${v}`, { row, column: h });
      if (m[1] === 'fixed' && m[2] === model.landFactor && !(v > 0)) throw new EstimationInputError(`row ${row}, column ${h}: land must be more than 0 ha, got ${v}`, { row, column: h });
      (m[1] === 'price' ? prices : fixed)[m[2]!] = v;
    }
    farms.push({ farm, fixed, prices, contracted, ...(Object.keys(contractPrices).length ? { contractPrices } : {}) });
  }
  if (!farms.length) throw new EstimationInputError('the file has a header but no farm rows');
  return farms;
}

export interface CommittedRequest {
  /** --committed item=quantity,... */
  pairs: Record<string, number> | null;
  /** Parsed --committed-file rows. */
  farms: ContractedFarmSpec[] | null;
  draws: number;
  seed: number;
  level: number;
}

/** The `committed` section of the fit document. */
export function committedSection(model: ForecastModel, point: { prices: Record<string, number>; fixed: Record<string, number> }, request: CommittedRequest): ContractedEvaluation {
  const farms = request.farms ?? [{ farm: EVALUATION_POINT_FARM, fixed: point.fixed, prices: point.prices, contracted: request.pairs ?? {} }];
  return evaluateContracted(model, { farms, prices: point.prices, draws: request.draws, seed: request.seed, level: request.level });
}
