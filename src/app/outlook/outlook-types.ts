/**
 * The shapes the season-outlook API answers with (server/outlook/API.md; the server types live in
 * server/outlook/{expectations,expectations-service,projection-service,outlook-service,accountability}.ts).
 * Declared here because those server modules import the database layer, which the client build
 * cannot type-check; only the fields the screens read are listed.
 */

export type ExpectationKind = 'last' | 'moving-average' | 'trend' | 'adaptive' | 'futures-basis' | 'manual';

export type ExpectationMethod =
  | { kind: 'last' }
  | { kind: 'moving-average'; k: number; olympic?: boolean }
  | { kind: 'trend'; seasons: number }
  | { kind: 'adaptive'; lambda: number }
  | { kind: 'futures-basis'; contract?: string | null; basisSeasons: number }
  | { kind: 'manual'; value: number };

export type BandRule = { kind: 'errors'; k: number } | { kind: 'percent'; pct: number } | { kind: 'manual'; low: number; high: number };

/** What the planner sets for one item (`PUT /api/outlooks/:id/expectations` sends a list of these). */
export interface ExpectationSetting {
  item: string;
  method: ExpectationMethod;
  band?: BandRule;
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
  rmsPct: number | null;
  meanPct: number | null;
}

/** One item's expected price as computed and stored with the draft (and frozen in a version). */
export interface ItemExpectation {
  item: string;
  name: string;
  role: 'output' | 'input';
  unit: string;
  currency: string;
  /** e.g. "EUR/t" */
  priceUnit: string;
  method: ExpectationMethod;
  methodLabel: string;
  band: BandRule;
  base: number;
  low: number;
  high: number;
  explanation: string;
  note: string;
  errors: ErrorHistory;
}

/** `GET /api/outlooks/:id/expectation-methods?item=`: every candidate method side by side. */
export interface MethodComparison {
  item: string;
  name: string;
  unit: string;
  priceUnit: string;
  season: string;
  errorWindow: number;
  history: { season: string; year: number; price: number }[];
  methods: {
    method: ExpectationMethod;
    label: string;
    value: number | null;
    explanation: string | null;
    errors: ErrorHistory | null;
    problem: string | null;
  }[];
}

export type ProjectionStatus = 'none' | 'queued' | 'running' | 'succeeded' | 'failed';

export interface ProjectionState {
  status: ProjectionStatus;
  /** 0..1 */
  progress: number;
  stage: string | null;
  error: string | null;
  projectedAt: string | null;
  /** The stored projection was made from the draft's current inputs (publishing needs this). */
  upToDate: boolean;
}

export interface VersionSummary {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  title: string;
  modelRunId: number | null;
  publishedAt: string;
  publishedBy: string | null;
}

/** `GET /api/outlooks` rows. */
export interface OutlookListRow {
  id: number;
  season: string;
  startYear: number;
  title: string;
  modelRunId: number | null;
  projectionStatus: ProjectionStatus;
  updatedAt: string;
  versions: number;
  latestVersion: { id: number; version: number; publishedAt: string } | null;
}

export type ScenarioRule = 'margin' | 'uniform';

/** `GET /api/outlooks/:id`. */
export interface OutlookDraft {
  id: number;
  season: string;
  seasonStartYear: number;
  title: string;
  modelRunId: number | null;
  expectationSettings: ExpectationSetting[];
  expectations: ItemExpectation[];
  scenarioRule: ScenarioRule;
  scenarioRuleText: string;
  draws: number;
  seed: number;
  commentary: string;
  projection: ProjectionState;
  versions: VersionSummary[];
  cautions: string[];
  createdAt: string;
  updatedAt: string;
}

export interface OutlookPatch {
  title?: string;
  modelRunId?: number | null;
  commentary?: string;
  scenarioRule?: ScenarioRule;
  draws?: number;
  seed?: number;
}

/** Engine summary of a simulated quantity, positive (supply or demand), in item units. */
export interface QuantitySummary {
  /** At the estimated parameters, without residuals. */
  point: number;
  mean: number;
  sd: number;
  median: number;
  p5: number;
  p95: number;
}

export type ScenarioName = 'low' | 'base' | 'high';
export const SCENARIO_NAMES: readonly ScenarioName[] = ['low', 'base', 'high'];

export interface ItemProjection {
  item: string;
  name: string;
  role: 'output' | 'input';
  unit: string;
  scenarios: Record<string, QuantitySummary>;
  tonnes: { unit: string; scenarios: Record<string, QuantitySummary> } | null;
}

export interface History {
  seasons: string[];
  items: Record<string, (number | null)[]>;
}

export interface TotalBand {
  point: number;
  mean: number;
  p5: number;
  p95: number;
}

export interface CoopProjection {
  items: ItemProjection[];
  deliveries: { unit: 't'; items: string[]; scenarios: Record<string, TotalBand>; bandNote: string } | null;
  capacity: {
    storageCapacityT: number;
    handlingCapacityTPerDay: number;
    scenarios: Record<string, { storageShare: TotalBand | null; handlingDays: TotalBand | null }>;
    note: string;
  } | null;
  history: History;
}

export interface FarmOutlook {
  farmId: number;
  code: string;
  name: string;
  region: string;
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
  trendSeason: number | null;
  scenarioRule: ScenarioRule;
  scenarioRuleText: string;
  scenarios: ScenarioPrices[];
  coop: CoopProjection;
  farms: FarmOutlook[];
  cautions: string[];
}

/** `GET /api/outlooks/:id/projection`. */
export interface ProjectionAnswer extends ProjectionState {
  result: ProjectionTables | null;
}

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
  id: number;
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
  projection: { draws: number; seed: number; trendSeason: number | null; computedAt: string; farmsProjected: number; coop: CoopProjection };
  cautions: string[];
}

/** `GET /api/outlooks/versions/:versionId` (planner, treasurer, admin): every farm. */
export interface FullVersion extends OutlookSnapshot {
  farms: FarmOutlook[];
}

/** `GET /api/portal/outlook[/versions/:id]` (member): their own farm only. */
export interface MemberVersion extends OutlookSnapshot {
  farm: FarmOutlook | null;
}

export interface MemberVersionRow {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  title: string;
  publishedAt: string;
}

export interface PublishAnswer {
  id: number;
  outlookId: number;
  version: number;
  season: string;
  publishedAt: string;
  mails: { queued: number; skipped: number };
}

export type DeliveryStatus = 'queued' | 'sending' | 'sent' | 'failed' | 'skipped';

export interface DeliveryRow {
  id: number;
  userId: number | null;
  name: string | null;
  to: string;
  status: DeliveryStatus;
  attempts: number;
  lastError: string | null;
  messageId: string | null;
  createdAt: string;
  nextAttemptAt: string | null;
  sentAt: string | null;
}

/** `GET /api/outlooks/:id/deliveries`. */
export interface DeliveryLog {
  outlookId: number;
  versionId: number;
  version: number;
  publishedAt: string;
  counts: Record<DeliveryStatus, number>;
  rows: DeliveryRow[];
}

export interface FuturesQuote {
  id: number;
  itemId: number;
  itemCode: string;
  seasonId: number;
  season: string;
  contract: string;
  quote: number;
  currency: string;
  quotedOn: string;
  source: string;
}

export interface FuturesQuoteInput {
  itemId: number;
  seasonId: number;
  contract: string;
  quote: number;
  currency: string;
  quotedOn: string;
  source: string;
}

export interface Comparison {
  item: string;
  name: string;
  unit: string;
  role: 'output' | 'input';
  projected: number;
  p5: number | null;
  p95: number | null;
  actual: number | null;
  error: number | null;
  errorPct: number | null;
  withinBand: boolean | null;
}

export interface AccountabilitySeason {
  season: string;
  startYear: number;
  outlookId: number;
  versionId: number;
  version: number;
  publishedAt: string;
  modelRunId: number;
  status: 'complete' | 'partial' | 'awaiting records';
  items: (Comparison & { farmsReported: number; farmsProjected: number })[];
  prices: {
    item: string;
    name: string;
    priceUnit: string;
    method: string;
    expected: { low: number; base: number; high: number };
    actual: number | null;
    errorPct: number | null;
    withinRange: boolean | null;
  }[];
  farms: { farmId: number; code: string; name: string; items: Comparison[] }[];
}

/** `GET /api/outlooks/accountability?version=latest|first`. */
export interface Accountability {
  version: 'latest' | 'first';
  errorSign: string;
  seasons: AccountabilitySeason[];
  summary: {
    items: { item: string; name: string; seasons: number; mape: number | null; bias: number | null; bandCoverage: number | null }[];
    prices: { item: string; seasons: number; mape: number | null; bias: number | null; rangeCoverage: number | null }[];
    farms: { farmId: number; code: string; name: string; comparisons: number; mape: number | null; bias: number | null }[];
  };
}

/** The scenario rule (margin or uniform) says what low and high mean; the words stay short. */
export const SCENARIO_LABELS: Record<string, string> = { low: 'Low scenario', base: 'Base scenario', high: 'High scenario' };

export function scenarioLabel(name: string): string {
  return SCENARIO_LABELS[name] ?? name;
}

/** The parts of `GET /api/models` rows the outlook pages read (the run to project with). */
export interface ModelListRow {
  id: number;
  name: string;
  definition: { items: string[] };
  runs: { id: number; modelId: number; status: string; finishedAt: string | null; dataHash: string }[];
}

/** Every finished run, newest first, labelled for a picker: "Model name · run #12, 2 Dec 2026". */
export function finishedRuns(models: readonly ModelListRow[]): { id: number; modelId: number; label: string; items: string[] }[] {
  return models
    .flatMap((m) =>
      m.runs
        .filter((r) => r.status === 'succeeded')
        .map((r) => ({
          id: r.id,
          modelId: m.id,
          items: m.definition.items,
          label: `${m.name} · run #${r.id}${r.finishedAt ? `, ${new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric' }).format(new Date(r.finishedAt))}` : ''}`,
        })),
    )
    .sort((a, b) => b.id - a.id);
}
