/**
 * Synthetic farm panels with known truth for the forecasting tests and benchmarks (invented data):
 * a per-hectare normalized quadratic technology (constant returns to land), each farm's own level
 * in every equation, season-wide shocks shared by all farms and joint across items, and residuals
 * whose per-hectare variance scales with land as (L / median)^δ.
 */
import type { NetputDataset } from './dataset.js';
import { choleskyLower, zeros, type Mat } from './linalg.js';
import type { ModelLayout } from './model.js';
import { normalizedQuadratic } from './nq.js';
import { SeededRandom } from './random.js';
import type { SyntheticItem } from './synthetic.js';

export interface ForecastPanelSpec {
  /** Items with their mean price and mean quantity PER HECTARE; the last is the numeraire (an input). */
  items: SyntheticItem[];
  farms: number;
  seasons: number;
  firstSeason: number;
  seed: number;
  /** Median land (ha, default 150) and the SD of log land (default 0.8). */
  landMedian?: number;
  landSdLog?: number;
  /** SD of farm effects, of season shocks and of residuals (at the median land), as shares of |mean netput per ha|. */
  farmSd?: number;
  seasonSd?: number;
  noise?: number;
  /** δ: per-hectare residual variance ∝ (land / median)^δ (default −0.6: larger farms are steadier per ha). */
  sizeExponent?: number;
  /** Season-to-season log price SD (default 0.12) and farm-level basis SD (default 0.03). */
  priceSd?: number;
  basisSd?: number;
  /** Off-diagonal −ρ in the B correlation (default 0.15). */
  rho?: number;
}

export interface ForecastPanel {
  dataset: NetputDataset;
  /** The per-hectare NQ technology (no fixed factors). */
  layout: ModelLayout;
  theta: number[];
  /** farmEffects[i][f], seasonEffects[i][s] (per hectare). */
  farmEffects: number[][];
  seasonEffects: number[][];
}

export function generateForecastPanel(spec: ForecastPanelSpec): ForecastPanel {
  const rng = new SeededRandom(spec.seed);
  const items = spec.items;
  const n = items.length;
  const nn = n - 1;
  const rho = spec.rho ?? 0.15;
  const layout: ModelLayout = {
    form: 'normalized-quadratic',
    items: items.map(({ name, role }) => ({ name, role })),
    numeraire: items[nn]!.name,
    factors: [],
    quadraticFactors: 0,
    trendOrigin: null,
    parameterNames: normalizedQuadratic.parameterNames(items, [], 0),
  };
  const pn = items[nn]!.price;
  const pt = items.slice(0, nn).map((it) => it.price / pn);
  const ybar = items.map((it) => (it.role === 'output' ? it.quantity : -it.quantity));
  const D = items.slice(0, nn).map((it, i) => Math.sqrt(((it.ownElasticity ?? 0.3) * ybar[i]!) / pt[i]!));
  const B: Mat = zeros(nn, nn);
  for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) B[i]![j] = D[i]! * D[j]! * (i === j ? 1 : -rho);
  if (!choleskyLower(B)) throw new Error('synthetic panel: B is not positive definite');
  const theta = new Array<number>(layout.parameterNames.length).fill(0);
  const idx = (s: string): number => layout.parameterNames.indexOf(s);
  const nm = items.map((x) => x.name);
  for (let i = 0; i < nn; i++) {
    let a = ybar[i]!;
    for (let j = 0; j < nn; j++) {
      if (j >= i) theta[idx(`b[${nm[i]},${nm[j]}]`)] = B[i]![j]!;
      a -= B[i]![j]! * pt[j]!;
    }
    theta[idx(`a[${nm[i]}]`)] = a;
  }
  let a0 = ybar[nn]!;
  for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) a0 += 0.5 * B[i]![j]! * pt[i]! * pt[j]!;
  theta[idx('a0')] = a0;

  const landMedian = spec.landMedian ?? 150;
  const landSdLog = spec.landSdLog ?? 0.8;
  const farmSd = spec.farmSd ?? 0.15;
  const seasonSd = spec.seasonSd ?? 0.08;
  const noise = spec.noise ?? 0.1;
  const delta = spec.sizeExponent ?? -0.6;
  const priceSd = spec.priceSd ?? 0.12;
  const basisSd = spec.basisSd ?? 0.03;
  const F = spec.farms;
  const S = spec.seasons;
  const land = Array.from({ length: F }, () => landMedian * Math.exp(landSdLog * rng.normal()));
  const farmEffects = items.map(() => new Array<number>(F).fill(0));
  for (let f = 0; f < F; f++) {
    const u = rng.normal();
    for (let i = 0; i < n; i++) farmEffects[i]![f] = farmSd * ybar[i]! * (0.7 * u + 0.714 * rng.normal());
  }
  const seasonEffects = items.map(() => new Array<number>(S).fill(0));
  for (let s = 0; s < S; s++) {
    const u = rng.normal();
    for (let i = 0; i < n; i++) seasonEffects[i]![s] = seasonSd * ybar[i]! * (0.8 * u + 0.6 * rng.normal());
  }
  const seasonPrices = Array.from({ length: S }, () => items.map((x) => x.price * Math.exp(priceSd * rng.normal() - 0.5 * priceSd * priceSd)));
  const T = F * S;
  const ds: NetputDataset = {
    items: layout.items.map((x) => ({ ...x })),
    fixedFactors: ['land'],
    seasons: [],
    seasonYears: [],
    farms: [],
    prices: items.map(() => new Array<number>(T)),
    quantities: items.map(() => new Array<number>(T)),
    fixed: [new Array<number>(T)],
    rows: [],
  };
  let obs = 0;
  for (let s = 0; s < S; s++)
    for (let f = 0; f < F; f++) {
      const p = items.map((_, i) => round(seasonPrices[s]![i]! * Math.exp(basisSd * rng.normal()), 4));
      const L = round(land[f]! * (1 + 0.03 * rng.normal()), 2);
      const d = normalizedQuadratic.decompose(layout, theta, p);
      const sdScale = Math.exp(0.5 * delta * Math.log(L / landMedian));
      items.forEach((x, i) => {
        const y = d.constant[i]! + farmEffects[i]![f]! + seasonEffects[i]![s]! + noise * Math.abs(ybar[i]!) * sdScale * rng.normal();
        const q = (x.role === 'output' ? y : -y) * L;
        ds.prices[i]![obs] = p[i]!;
        ds.quantities[i]![obs] = round(Math.max(0, q), 3);
      });
      ds.fixed[0]![obs] = L;
      ds.seasons.push(String(spec.firstSeason + s));
      ds.seasonYears.push(spec.firstSeason + s);
      ds.farms!.push(`F${String(f + 1).padStart(4, '0')}`);
      ds.rows.push(obs + 2);
      obs++;
    }
  return { dataset: ds, layout, theta, farmEffects, seasonEffects };
}

/** Per-hectare demo items (quantities per ha of land). */
export const PER_HECTARE_ITEMS: SyntheticItem[] = [
  { name: 'wheat', role: 'output', price: 250, quantity: 6, ownElasticity: 0.4 },
  { name: 'canola', role: 'output', price: 520, quantity: 1.5, ownElasticity: 0.6 },
  { name: 'nitrogen', role: 'input', price: 1200, quantity: 0.15, ownElasticity: -0.5 },
  { name: 'diesel', role: 'input', price: 1.1, quantity: 60, ownElasticity: -0.3 },
  { name: 'other', role: 'input', price: 100, quantity: 8 },
];

function round(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}
