/**
 * Season-outlook shapes shared by the API (server/outlook) and the screens: price expectations,
 * the projection tables and the published snapshot. Plain data, no Node imports.
 */
import type { BandFacts } from './band-words.js';
import type { Nutrient } from './budget-types.js';
import type { QuantitySummary } from './estimation-types.js';

export type { QuantitySummary } from './estimation-types.js';

export type ExpectationMethod =
  | { kind: 'last' }
  | { kind: 'moving-average'; k: number; olympic?: boolean }
  | { kind: 'trend'; seasons: number }
  | { kind: 'adaptive'; lambda: number }
  | { kind: 'futures-basis'; contract?: string | null; basisSeasons: number }
  | { kind: 'manual'; value: number };

export type ExpectationKind = ExpectationMethod['kind'];

export type BandRule = { kind: 'errors'; k: number } | { kind: 'percent'; pct: number } | { kind: 'manual'; low: number; high: number };

/** What the planner sets for one item (`PUT /api/outlooks/:id/expectations` sends a list of these). */
export interface ExpectationSetting {
  item: string;
  method: ExpectationMethod;
  band?: BandRule;
  /** The planner's own words about the choice. */
  note?: string;
}

export interface PastError {
  season: string;
  expected: number;
  actual: number;
  /** 100 · (actual − expected) / expected */
  errorPct: number;
}

export interface ErrorHistory {
  seasons: PastError[];
  /** Root mean square of the relative errors, in %. */
  rmsPct: number | null;
  /** Mean relative error, in % (positive: prices came out above the expectation). */
  meanPct: number | null;
}

/** One item's expected price, its band and how it was made. */
export interface ComputedExpectation {
  item: string;
  method: ExpectationMethod;
  methodLabel: string;
  band: BandRule;
  base: number;
  low: number;
  high: number;
  /** e.g. "EUR/t" */
  priceUnit: string;
  explanation: string;
  note: string;
  inputs: Record<string, unknown>;
  errors: ErrorHistory;
}

/** A computed expectation with the item's facts, as stored with the draft (and frozen in a version). */
export interface ItemExpectation extends ComputedExpectation {
  name: string;
  role: 'output' | 'input';
  unit: string;
  currency: string;
}

export type ScenarioRule = 'margin' | 'uniform';

export type ScenarioName = 'low' | 'base' | 'high';
export const SCENARIO_NAMES: readonly ScenarioName[] = ['low', 'base', 'high'];
export type ByScenario<T> = Record<string, T>;

export interface ItemProjection {
  item: string;
  name: string;
  role: 'output' | 'input';
  unit: string;
  /** Supply (outputs) or demand (inputs), positive, per scenario: point at θ̂, mean, sd, median, 5% and 95%. */
  scenarios: ByScenario<QuantitySummary>;
  /** The same in tonnes, for items counted by mass (t, kg N, ...); null for litres and hours. */
  tonnes: { unit: string; scenarios: ByScenario<QuantitySummary> } | null;
}

export interface History {
  seasons: string[];
  /** Per item code, the recorded quantity per season (null when nothing was recorded). */
  items: Record<string, (number | null)[]>;
}

export interface TotalBand {
  point: number;
  mean: number;
  /** Sums of the items' 5% and 95% points: a conservative band (it assumes the items move together). */
  p5: number;
  p95: number;
}

export interface CapacityComparison {
  storageCapacityT: number;
  handlingCapacityTPerDay: number;
  /** Per scenario: deliveries as a share of storage capacity, and days of intake at full handling capacity. */
  scenarios: ByScenario<{ storageShare: TotalBand | null; handlingDays: TotalBand | null }>;
  note: string;
}

export interface CoopProjection {
  items: ItemProjection[];
  /** Outputs delivered in tonnes (grain and oilseed), summed. */
  deliveries: { unit: 't'; items: string[]; scenarios: ByScenario<TotalBand>; bandNote: string } | null;
  capacity: CapacityComparison | null;
  history: History;
}

export interface FarmOutlook {
  farmId: number;
  code: string;
  name: string;
  region: string;
  /** Fixed factors the farm was projected at (land in ha, trend). */
  fixed: Record<string, number>;
  fixedSource: string;
  items: ItemProjection[];
  history: History;
}

export interface ScenarioPrices {
  name: string;
  prices: Record<string, number>;
  curvatureViolations: number;
  curvatureViolationShare: number;
}

export interface ProjectionTables {
  inputsHash: string;
  computedAt: string;
  season: { label: string; startYear: number };
  modelRunId: number;
  draws: number;
  seed: number;
  /** The season year the trend was set to (null when the model has no trend). */
  trendSeason: number | null;
  scenarioRule: ScenarioRule;
  scenarioRuleText: string;
  scenarios: ScenarioPrices[];
  coop: CoopProjection;
  farms: FarmOutlook[];
  cautions: string[];
  /** What the bands cover (absent in projections made before it was recorded). */
  band?: BandFacts & { words: string };
}

/** Where a published outlook's numbers come from. */
export interface ModelFacts {
  runId: number;
  modelId: number;
  modelName: string;
  form: string;
  numeraire: string;
  factors: string[];
  dataHash: string;
  softwareVersion: string;
  observations: number;
  sampleSeasons: { first: number; last: number };
  fittedAt: string | null;
}

/** The co-op part of a published version: what every reader sees. */
export interface OutlookSnapshot {
  outlookId: number;
  version: number;
  season: { label: string; startYear: number };
  title: string;
  commentary: string;
  publishedAt: string;
  publishedBy: string | null;
  coopName: string;
  currency: string;
  model: ModelFacts;
  expectations: ItemExpectation[];
  scenarioRule: ScenarioRule;
  scenarioRuleText: string;
  scenarios: ScenarioPrices[];
  projection: { draws: number; seed: number; trendSeason: number | null; computedAt: string; farmsProjected: number; coop: CoopProjection; band?: BandFacts & { words: string } };
  cautions: string[];
  /** The model's back-test in words at publishing, and the items it did not beat the plain rule for (published anyway). */
  skill?: { text: string; weakItems: { item: string; name: string; sentence: string }[] } | null;
}

/** `GET /api/outlooks/versions/:versionId` (planner, treasurer, admin): every farm. */
export interface FullVersion extends OutlookSnapshot {
  id: number;
  farms: FarmOutlook[];
}

/** `GET /api/portal/outlook[/versions/:id]` (member): their own farm only. */
export interface MemberVersion extends OutlookSnapshot {
  id: number;
  farm: FarmOutlook | null;
  /** The portal's plain reading (server/outlook/member-plain.ts). */
  plain: MemberPlain;
}

/** One nutrient of the member's fertiliser estimate. */
export interface PlainFertiliserLine {
  item: string;
  name: string;
  nutrient: 'N' | 'P2O5' | 'K2O';
  /** e.g. "kg N" */
  unit: string;
  /** The farm's projected need at the base prices, in the unit. */
  kg: number;
  kgPerHa: number | null;
  /** The outlook's expected price per unit (base), in the outlook's currency. */
  pricePerKg: number;
  cost: number;
  /** The need and the price of the low and of the high scenario. */
  costLow: number;
  costHigh: number;
}

/** What the member portal shows in plain words, beside the version's own figures. */
export interface MemberPlain {
  /** Item codes in the one order every section follows: outputs first, then inputs, in the model's order. */
  itemOrder: string[];
  /** The model's sample as season labels ("2006/07"). */
  sampleSeasons: { first: string; last: string };
  farmLandHa: number | null;
  /** The land of every farm projected, summed. */
  coopLandHa: number | null;
  /** Base figure per hectare, per item code (null without land). */
  farmPerHa: Record<string, number | null>;
  coopPerHa: Record<string, number | null>;
  /** The farm's fertiliser need and bill at the outlook's prices (null: no farm or no nutrient item). */
  fertiliser: { lines: PlainFertiliserLine[]; total: number; totalLow: number; totalHigh: number; currency: string; caution: string } | null;
  /** What the band covers, in words. */
  bandWords: string;
  /** The low and high scenarios without a formula. */
  scenarioWords: string;
  /** Where the numbers come from, one sentence. */
  source: string;
}

/** Projected against actual for one item, after the season. */
export interface Comparison {
  item: string;
  name: string;
  unit: string;
  role: 'output' | 'input';
  /** Base scenario: point projection and 5–95% band (for the co-op row, only when every farm reported). */
  projected: number;
  p5: number | null;
  p95: number | null;
  actual: number | null;
  error: number | null;
  errorPct: number | null;
  withinBand: boolean | null;
}

/** After the season, one nutrient of one farm (or of the farms with records together), in kg of the nutrient. */
export interface FertiliserComparison {
  nutrient: Nutrient;
  name: string;
  unit: string;
  /** The published outlook's base point projection (null: the farm was not projected). */
  projected: number | null;
  /** Booked through the co-op's booking round (null: no round for the season). */
  booked: number | null;
  /** Used, from the farm records (null: no fertiliser recorded). */
  actual: number | null;
  /** booked ÷ actual (null when either is missing or nothing was used). */
  bookedShareOfUse: number | null;
  /** (projected − actual) / actual in percent, the sign of the other errors. */
  errorPct: number | null;
  words: string;
}
